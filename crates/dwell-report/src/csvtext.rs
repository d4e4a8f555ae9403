//! Small helpers shared by the study writers: CSV text and number formatting.

use crate::outdir::ReportError;

/// A number with `d` decimals; empty for NaN or None (a spreadsheet reads an empty cell).
pub(crate) fn num(v: Option<f64>, d: usize) -> String {
    match v {
        Some(x) if x.is_finite() => format!("{x:.d$}"),
        _ => String::new(),
    }
}

/// CSV text of a header and rows.
pub(crate) fn csv_text(
    header: &[&str],
    rows: impl Iterator<Item = Vec<String>>,
) -> Result<String, ReportError> {
    let fmt = |e: csv::Error| ReportError::Format {
        what: "CSV".into(),
        message: e.to_string(),
    };
    let mut w = csv::Writer::from_writer(Vec::new());
    w.write_record(header).map_err(fmt)?;
    for r in rows {
        w.write_record(&r).map_err(fmt)?;
    }
    let bytes = w.into_inner().map_err(|e| ReportError::Format {
        what: "CSV".into(),
        message: e.to_string(),
    })?;
    Ok(String::from_utf8(bytes).expect("CSV of UTF-8 strings is UTF-8"))
}

/// Pretty JSON of a value.
pub(crate) fn json<T: serde::Serialize>(v: &T, what: &str) -> Result<String, ReportError> {
    serde_json::to_string_pretty(v).map_err(|e| ReportError::Format {
        what: what.into(),
        message: e.to_string(),
    })
}

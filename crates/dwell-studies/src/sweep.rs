//! Sweeps: one simulation per row of a CSV of variants, run in parallel, one result row per
//! variant, split into deterministic shards and merged again.
//!
//! Rows file (docs/sweep.md): a header `variant,<column>,…`; each further column is either
//! `patch` (a JSON Merge Patch file, RFC 7386, relative to the rows file) or a JSON pointer
//! (RFC 6901) into the model, such as `/heaters/0/capacity_w`, whose cell is a JSON value
//! (`2.5`, `true`, `"text"`; a bare word is taken as a string). An empty cell changes
//! nothing. The patch is applied first, then the pointers left to right.
//!
//! Speed: each variant runs the summary-only fast path ([`crate::fastpath`]): the weather,
//! sun, planes and schedule tables are computed once per sweep and shared by all threads;
//! per variant only the patch, model compile, discretisation, stepper and the stepping with
//! the thermostat remain. Its figures equal `dwell simulate`'s summary (tested to 1e-9).
//!
//! Memory: rows run in chunks of a few per thread and each is reduced to one
//! [`SweepResult`] as it steps; no trajectory is kept.

use std::path::{Path, PathBuf};

use rayon::prelude::*;
use serde_json::Value;

use crate::fastpath::SweepContext;
use crate::simulate::SimOptions;

/// A sweep that cannot be read or merged.
#[derive(Debug, thiserror::Error)]
#[non_exhaustive]
pub enum SweepError {
    /// A problem at a line of a file.
    #[error("{file}:{line}: {message}")]
    At {
        /// File.
        file: String,
        /// 1-based line.
        line: usize,
        /// What is wrong and what to do.
        message: String,
    },
    /// A problem with a whole file or option.
    #[error("{0}")]
    Other(String),
}

/// One variant of a sweep.
#[derive(Clone, Debug)]
pub struct SweepRow {
    /// 1-based index among the rows (the order of the file).
    pub index: usize,
    /// Line in the rows file.
    pub line: usize,
    /// Variant name.
    pub name: String,
    /// Patch file, resolved against the rows file's folder.
    pub patch: Option<PathBuf>,
    /// (JSON pointer, value) pairs set after the patch.
    pub sets: Vec<(String, Value)>,
}

/// Reads a rows file (text) whose folder is `dir`.
pub fn parse_rows(text: &str, file: &str, dir: &Path) -> Result<Vec<SweepRow>, SweepError> {
    let at = |line: usize, message: String| SweepError::At {
        file: file.to_string(),
        line,
        message,
    };
    let mut rdr = csv::ReaderBuilder::new()
        .comment(Some(b'#'))
        .trim(csv::Trim::All)
        .from_reader(text.as_bytes());
    let headers: Vec<String> = rdr
        .headers()
        .map_err(|e| at(1, e.to_string()))?
        .iter()
        .map(|h| h.trim_start_matches('\u{feff}').to_string())
        .collect();
    if headers.first().map(String::as_str) != Some("variant") {
        return Err(at(1, format!("the first column must be `variant` (found `{}`); then `patch` and/or JSON pointers such as /heaters/0/capacity_w", headers.first().cloned().unwrap_or_default())));
    }
    for h in &headers[1..] {
        if h != "patch" && !h.starts_with('/') {
            return Err(at(1, format!("column `{h}` is neither `patch` nor a JSON pointer starting with `/` (e.g. /zones/0/volume_m3)")));
        }
    }
    let mut rows = Vec::new();
    let mut names = std::collections::HashMap::new();
    for rec in rdr.records() {
        let rec = rec.map_err(|e| {
            at(
                e.position().map_or(0, |p| p.line() as usize),
                format!("{e}; every row needs one field per header column"),
            )
        })?;
        let line = rec.position().map_or(0, |p| p.line() as usize);
        let name = rec.get(0).unwrap_or("").to_string();
        if name.is_empty() {
            return Err(at(
                line,
                "empty variant name; give every row a unique name".into(),
            ));
        }
        if let Some(prev) = names.insert(name.clone(), line) {
            return Err(at(
                line,
                format!("variant `{name}` is also on line {prev}; names must be unique"),
            ));
        }
        let mut patch = None;
        let mut sets = Vec::new();
        for (h, cell) in headers.iter().zip(rec.iter()).skip(1) {
            if cell.is_empty() {
                continue;
            }
            if h == "patch" {
                patch = Some(dir.join(cell));
            } else {
                let v =
                    serde_json::from_str(cell).unwrap_or_else(|_| Value::String(cell.to_string()));
                sets.push((h.clone(), v));
            }
        }
        rows.push(SweepRow {
            index: rows.len() + 1,
            line,
            name,
            patch,
            sets,
        });
    }
    if rows.is_empty() {
        return Err(SweepError::Other(format!(
            "{file}: no rows; add one line per variant under the header"
        )));
    }
    Ok(rows)
}

/// The rows of shard `i` of `n` (1-based): every `n`-th row starting at row `i`, so shards are
/// deterministic, disjoint, cover every row and get near-equal counts.
pub fn shard(rows: &[SweepRow], i: usize, n: usize) -> Vec<SweepRow> {
    rows.iter()
        .filter(|r| (r.index - 1) % n == i - 1)
        .cloned()
        .collect()
}

/// Sets `pointer` (RFC 6901) in `v` to `value`; the parent must exist.
pub fn set_pointer(v: &mut Value, pointer: &str, value: Value) -> Result<(), String> {
    let (parent, last) = pointer
        .rsplit_once('/')
        .ok_or_else(|| format!("`{pointer}` is not a JSON pointer"))?;
    let last = last.replace("~1", "/").replace("~0", "~");
    let p = v.pointer_mut(parent).ok_or_else(|| {
        format!("`{parent}` does not exist in the model (array indices start at 0)")
    })?;
    match p {
        Value::Object(m) => {
            m.insert(last, value);
            Ok(())
        }
        Value::Array(a) => {
            let k: usize = last
                .parse()
                .map_err(|_| format!("`{pointer}`: `{last}` is not an array index"))?;
            let n = a.len();
            let slot = a.get_mut(k).ok_or_else(|| {
                format!("`{pointer}`: index {k} is past the end (the array has {n} entries)")
            })?;
            *slot = value;
            Ok(())
        }
        _ => Err(format!("`{parent}` is not an object or array")),
    }
}

/// The result of one variant.
#[derive(Clone, Debug)]
pub struct SweepResult {
    /// Row index (1-based).
    pub index: usize,
    /// Variant name.
    pub name: String,
    /// `ok` or the error in words.
    pub status: String,
    /// Number of states of the variant's network.
    pub states: usize,
    /// Heat delivered (kWh).
    pub heating_kwh: f64,
    /// Highest hourly heating power (W).
    pub peak_heating_w: f64,
    /// Purchased energy (kWh).
    pub purchased_kwh: f64,
    /// Lowest hourly air temperature over zones (°C).
    pub min_air_c: f64,
    /// Hours simulated.
    pub hours: usize,
}

/// CSV header of result rows.
pub const RESULT_HEADER: &str =
    "row,variant,status,states,heating_kwh,peak_heating_w,purchased_kwh,min_air_c,hours";

impl SweepResult {
    /// One CSV line (no newline).
    pub fn csv_line(&self) -> String {
        let name = if self.name.contains([',', '"']) {
            format!("\"{}\"", self.name.replace('"', "\"\""))
        } else {
            self.name.clone()
        };
        let status = format!(
            "\"{}\"",
            self.status.replace('"', "\"\"").replace('\n', " | ")
        );
        format!(
            "{},{name},{status},{},{:.3},{:.1},{:.3},{:.2},{}",
            self.index,
            self.states,
            self.heating_kwh,
            self.peak_heating_w,
            self.purchased_kwh,
            self.min_air_c,
            self.hours
        )
    }
}

/// Patches, builds, discretises and runs one variant in `ctx` and reduces it to a row.
pub fn run_row(base: &Value, file: &str, row: &SweepRow, ctx: &SweepContext) -> SweepResult {
    let mut out = SweepResult {
        index: row.index,
        name: row.name.clone(),
        status: "ok".into(),
        states: 0,
        heating_kwh: f64::NAN,
        peak_heating_w: f64::NAN,
        purchased_kwh: f64::NAN,
        min_air_c: f64::NAN,
        hours: 0,
    };
    let run = || -> Result<SweepResult, String> {
        let mut v = base.clone();
        if let Some(p) = &row.patch {
            let text = std::fs::read_to_string(p)
                .map_err(|e| format!("cannot read patch {}: {e}", p.display()))?;
            let patch: Value = serde_json::from_str(&text).map_err(|e| {
                format!(
                    "{}:{}:{}: not valid JSON: {e}",
                    p.display(),
                    e.line(),
                    e.column()
                )
            })?;
            dwell_model::patch::merge_patch(&mut v, &patch);
        }
        for (ptr, val) in &row.sets {
            set_pointer(&mut v, ptr, val.clone()).map_err(|e| format!("column {ptr}: {e}"))?;
        }
        let label = format!("{file} + variant {}", row.name);
        let m = dwell_model::from_value(v, &label).map_err(|e| e.to_string())?;
        let h = dwell_model::compile(&m, &label).map_err(|e| e.to_string())?;
        let s = ctx.run(&m, &h).map_err(|e| e.to_string())?;
        Ok(SweepResult {
            states: s.states,
            heating_kwh: s.heating_kwh,
            peak_heating_w: s.peak_heating_w,
            purchased_kwh: s.purchased_kwh,
            min_air_c: s.min_air_c,
            hours: s.hours,
            ..out.clone()
        })
    };
    match run() {
        Ok(r) => r,
        Err(e) => {
            out.status = format!("error: {e}");
            out
        }
    }
}

/// Runs `rows` on all cores, handing each result to `sink` in row order as soon as its chunk
/// is done; `tick` is called once per finished variant (for a progress bar).
pub fn run_sweep(
    base: &Value,
    file: &str,
    rows: &[SweepRow],
    weather: &dwell_weather::WeatherSeries,
    opts: &SimOptions,
    mut sink: impl FnMut(&SweepResult) -> std::io::Result<()>,
    tick: &(dyn Fn() + Sync),
) -> std::io::Result<()> {
    let ctx = SweepContext::new(weather, opts);
    run_sweep_in(base, file, rows, &ctx, &mut sink, tick)
}

/// [`run_sweep`] in a context the caller keeps (to reuse its tables over several sweeps).
pub fn run_sweep_in(
    base: &Value,
    file: &str,
    rows: &[SweepRow],
    ctx: &SweepContext,
    mut sink: impl FnMut(&SweepResult) -> std::io::Result<()>,
    tick: &(dyn Fn() + Sync),
) -> std::io::Result<()> {
    let chunk = 16 * rayon::current_num_threads().max(1);
    for part in rows.chunks(chunk) {
        let results: Vec<SweepResult> = part
            .par_iter()
            .map(|r| {
                let x = run_row(base, file, r, ctx);
                tick();
                x
            })
            .collect();
        for r in &results {
            sink(r)?;
        }
    }
    Ok(())
}

/// FNV-1a 64-bit hash (identity of inputs, not security): Fowler–Noll–Vo, offset basis
/// 0xcbf29ce484222325, prime 0x100000001b3.
pub fn fnv1a(bytes: &[u8]) -> u64 {
    let mut h: u64 = 0xcbf2_9ce4_8422_2325;
    for b in bytes {
        h ^= *b as u64;
        h = h.wrapping_mul(0x0000_0100_0000_01b3);
    }
    h
}

/// What a shard ran, written beside its results (`sweep.json`) and checked by merge.
#[derive(Clone, Debug, PartialEq, serde::Serialize, serde::Deserialize)]
pub struct Manifest {
    /// Hash of the rows file.
    pub rows_hash: String,
    /// Hash of the model file.
    pub model_hash: String,
    /// Hash of the weather and options.
    pub options_hash: String,
    /// Shard number (1-based).
    pub shard: usize,
    /// Number of shards.
    pub shards: usize,
    /// Rows in the whole rows file.
    pub total_rows: usize,
    /// Rows in this shard.
    pub shard_rows: usize,
}

/// Merges shard outputs `(manifest, results CSV text, name)`: checks they come from the same
/// rows, model and options, that every shard 1…N is there once and that the rows add up,
/// and returns the results in row order.
pub fn merge(parts: &[(Manifest, String, String)]) -> Result<String, SweepError> {
    let first = &parts
        .first()
        .ok_or_else(|| SweepError::Other("give the output folders of the shards to merge".into()))?
        .0;
    let mut seen = vec![None; first.shards + 1];
    for (m, _, name) in parts {
        for (what, a, b) in [
            ("rows file", &m.rows_hash, &first.rows_hash),
            ("model", &m.model_hash, &first.model_hash),
            ("weather and options", &m.options_hash, &first.options_hash),
        ] {
            if a != b {
                return Err(SweepError::Other(format!("{name}: ran a different {what} than {} (hash {a} vs {b}); merge only shards of one sweep", parts[0].2)));
            }
        }
        if m.shards != first.shards || m.total_rows != first.total_rows {
            return Err(SweepError::Other(format!(
                "{name}: shard {}/{} of {} rows does not match {} ({}/{} of {})",
                m.shard,
                m.shards,
                m.total_rows,
                parts[0].2,
                first.shard,
                first.shards,
                first.total_rows
            )));
        }
        if let Some(prev) = seen.get(m.shard).cloned().flatten() {
            return Err(SweepError::Other(format!(
                "{name}: shard {}/{} is also in {prev}; give each shard once",
                m.shard, m.shards
            )));
        }
        seen[m.shard] = Some(name.clone());
    }
    let missing: Vec<String> = (1..=first.shards)
        .filter(|i| seen[*i].is_none())
        .map(|i| i.to_string())
        .collect();
    if !missing.is_empty() {
        return Err(SweepError::Other(format!(
            "shards {} of {} are missing; run them and merge again",
            missing.join(", "),
            first.shards
        )));
    }
    let mut lines: Vec<(usize, String)> = Vec::new();
    for (m, text, name) in parts {
        let mut count = 0;
        for (k, l) in text.lines().enumerate().skip(1) {
            if l.is_empty() {
                continue;
            }
            let idx: usize = l
                .split(',')
                .next()
                .and_then(|x| x.parse().ok())
                .ok_or_else(|| SweepError::At {
                    file: name.clone(),
                    line: k + 1,
                    message:
                        "no row number in the first column; was this file written by dwell sweep?"
                            .into(),
                })?;
            lines.push((idx, l.to_string()));
            count += 1;
        }
        if count != m.shard_rows {
            return Err(SweepError::Other(format!("{name}: {count} result rows but the shard had {}; the run did not finish — run that shard again", m.shard_rows)));
        }
    }
    lines.sort_by_key(|(i, _)| *i);
    let mut out = String::from(RESULT_HEADER);
    out.push('\n');
    for (_, l) in lines {
        out.push_str(&l);
        out.push('\n');
    }
    Ok(out)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn rows_parse_and_shards_partition() {
        let t = "variant,patch,/heaters/0/capacity_w,/name\nbase,,,\nsmall,,4000,\"small one\"\nbig,p.json,9000,\n";
        let rows = parse_rows(t, "r.csv", Path::new("d")).unwrap();
        assert_eq!(rows.len(), 3);
        assert_eq!(
            rows[1].sets[0],
            ("/heaters/0/capacity_w".to_string(), serde_json::json!(4000))
        );
        assert_eq!(rows[1].sets[1].1, serde_json::json!("small one"));
        assert_eq!(rows[2].patch.as_deref(), Some(Path::new("d/p.json")));
        let mut all: Vec<usize> = (1..=2)
            .flat_map(|i| shard(&rows, i, 2))
            .map(|r| r.index)
            .collect();
        all.sort();
        assert_eq!(all, vec![1, 2, 3]);
        assert_eq!(shard(&rows, 1, 2).len(), 2);
        let e = parse_rows("variant,/a\nx,1\nx,2\n", "r.csv", Path::new("."))
            .unwrap_err()
            .to_string();
        assert_eq!(
            e,
            "r.csv:3: variant `x` is also on line 2; names must be unique"
        );
    }

    #[test]
    fn pointers_set_existing_places_only() {
        let mut v = serde_json::json!({"heaters": [{"capacity_w": 1}]});
        set_pointer(&mut v, "/heaters/0/capacity_w", serde_json::json!(5)).unwrap();
        assert_eq!(v["heaters"][0]["capacity_w"], 5);
        assert!(
            set_pointer(&mut v, "/heaters/3/capacity_w", serde_json::json!(5))
                .unwrap_err()
                .contains("does not exist")
        );
    }

    #[test]
    fn merge_checks_identity_and_completeness() {
        let m = |shard, rows| Manifest {
            rows_hash: "a".into(),
            model_hash: "b".into(),
            options_hash: "c".into(),
            shard,
            shards: 2,
            total_rows: 3,
            shard_rows: rows,
        };
        let h = RESULT_HEADER;
        let s1 = format!("{h}\n1,a,ok\n3,c,ok\n");
        let s2 = format!("{h}\n2,b,ok\n");
        let merged = merge(&[
            (m(2, 1), s2.clone(), "s2".into()),
            (m(1, 2), s1.clone(), "s1".into()),
        ])
        .unwrap();
        assert_eq!(merged, format!("{h}\n1,a,ok\n2,b,ok\n3,c,ok\n"));
        assert!(merge(&[(m(1, 2), s1.clone(), "s1".into())])
            .unwrap_err()
            .to_string()
            .contains("shards 2 of 2 are missing"));
        let mut other = m(2, 1);
        other.model_hash = "z".into();
        assert!(merge(&[
            (m(1, 2), s1.clone(), "s1".into()),
            (other, s2.clone(), "s2".into())
        ])
        .unwrap_err()
        .to_string()
        .contains("different model"));
        assert!(
            merge(&[(m(1, 2), s1, "s1".into()), (m(2, 2), s2, "s2".into())])
                .unwrap_err()
                .to_string()
                .contains("did not finish")
        );
    }
}

//! Reading a model file: JSON syntax, types and unknown fields, with the place of each error.

use std::path::Path;

use crate::error::{suggest, ModelError, Problem};
use crate::file::ModelFile;
use crate::validate;

/// Reads, parses and validates a model file.
pub fn read_model(path: &Path) -> Result<ModelFile, ModelError> {
    let file = path.display().to_string();
    let text = std::fs::read_to_string(path).map_err(|source| ModelError::Io {
        file: file.clone(),
        source,
    })?;
    parse_model(&text, &file)
}

/// Parses and validates model text; `file` names it in errors.
pub fn parse_model(text: &str, file: &str) -> Result<ModelFile, ModelError> {
    let value: serde_json::Value = serde_json::from_str(text).map_err(|e| ModelError::Syntax {
        file: file.to_string(),
        line: e.line(),
        column: e.column(),
        message: strip_position(&e.to_string()),
    })?;
    from_value(value, file)
}

/// Converts an already-parsed JSON value (for example a patched model) and validates it.
pub fn from_value(value: serde_json::Value, file: &str) -> Result<ModelFile, ModelError> {
    let model: ModelFile = serde_path_to_error::deserialize(value).map_err(|e| {
        let path = json_path(&e.path().to_string());
        let message = explain(&strip_position(&e.inner().to_string()));
        ModelError::Invalid {
            file: file.to_string(),
            problems: vec![Problem { path, message }],
        }
    })?;
    let problems = validate::validate(&model);
    if problems.is_empty() {
        Ok(model)
    } else {
        Err(ModelError::Invalid {
            file: file.to_string(),
            problems,
        })
    }
}

/// `zones[2].area` → `$.zones[2].area`; `.` → `$`.
pub(crate) fn json_path(p: &str) -> String {
    if p.is_empty() || p == "." {
        "$".into()
    } else if p.starts_with('[') {
        format!("${p}")
    } else {
        format!("$.{p}")
    }
}

fn strip_position(msg: &str) -> String {
    match msg.rfind(" at line ") {
        Some(i) => msg[..i].to_string(),
        None => msg.to_string(),
    }
}

/// Adds a "did you mean" to serde's unknown-field and unknown-variant messages.
fn explain(msg: &str) -> String {
    for (head, what) in [("unknown field `", "field"), ("unknown variant `", "value")] {
        if let Some(rest) = msg.strip_prefix(head) {
            let Some(end) = rest.find('`') else { break };
            let word = &rest[..end];
            let expected: Vec<&str> = rest[end + 1..].split('`').skip(1).step_by(2).collect();
            let mut out = format!("unknown {what} `{word}`");
            if let Some(s) = suggest(word, expected.iter().copied()) {
                out.push_str(&format!("; did you mean `{s}`?"));
            }
            if !expected.is_empty() {
                out.push_str(&format!(" (allowed: {})", expected.join(", ")));
            }
            return out;
        }
    }
    msg.to_string()
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn unknown_fields_get_a_suggestion_and_a_path() {
        let text = r#"{"materials": [{"id": "brick", "conductivity_w_mk": 0.8, "density_kg_m3": 1700, "specific_heat_j_kg_k": 800}]}"#;
        let e = parse_model(text, "m.json").unwrap_err();
        let p = &e.problems()[0];
        assert_eq!(p.path, "$.materials[0].specific_heat_j_kg_k");
        assert!(
            p.message.contains("did you mean `specific_heat_j_kgk`?"),
            "{}",
            p.message
        );
    }

    #[test]
    fn syntax_errors_give_line_and_column() {
        let e = parse_model("{\n  \"zones\": [,]\n}", "m.json").unwrap_err();
        match e {
            ModelError::Syntax { line, column, .. } => assert_eq!((line, column), (2, 13)),
            other => panic!("{other}"),
        }
    }

    #[test]
    fn wrong_types_name_the_path() {
        let e = parse_model(
            r#"{"zones": [{"id": "a", "floor_area_m2": "big", "volume_m3": 3}]}"#,
            "m.json",
        )
        .unwrap_err();
        assert_eq!(e.problems()[0].path, "$.zones[0].floor_area_m2");
        assert!(
            e.problems()[0].message.contains("invalid type"),
            "{}",
            e.problems()[0].message
        );
    }
}

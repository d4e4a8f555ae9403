//! `dwell compare MODEL --variant NAME=PATCH.json …`: options side by side.

use std::collections::BTreeMap;
use std::path::{Path, PathBuf};

use dwell_studies::compare::{compare_with_progress, grid, patched, Comparison, Variant};
use dwell_studies::SimOptions;
use serde_json::Value;

use super::simulate::load_weather;
use crate::exit::bad_input;

/// Arguments of `dwell compare`.
#[derive(clap::Args)]
pub struct CompareArgs {
    /// Model file (JSON): the base
    pub model: PathBuf,
    /// A variant: NAME=PATCH.json, a JSON Merge Patch (RFC 7386) on the model; repeat
    #[arg(long = "variant", value_name = "NAME=PATCH")]
    pub variants: Vec<String>,
    /// An option list for a grid: KEY=P1.json,P2.json,… (`-` = no change); every combination
    /// of one entry per --grid is a variant named KEY=stem,KEY2=stem
    #[arg(long = "grid", value_name = "KEY=P1,P2")]
    pub grids: Vec<String>,
    /// Upgrade cost of a variant or of one patch: NAME=AMOUNT (a grid variant adds its patches')
    #[arg(long = "cost", value_name = "NAME=AMOUNT")]
    pub costs: Vec<String>,
    /// Price of purchased energy for every heater (money/kWh); default the model's prices
    #[arg(long)]
    pub price: Option<f64>,
    #[command(flatten)]
    pub period: super::period::PeriodArgs,
    /// Output folder (created if missing)
    #[arg(long)]
    pub out: PathBuf,
    /// Print nothing but errors
    #[arg(long, short)]
    pub quiet: bool,
}

fn split_eq<'a>(flag: &str, s: &'a str) -> anyhow::Result<(&'a str, &'a str)> {
    match s.split_once('=') {
        Some((a, b)) if !a.trim().is_empty() && !b.trim().is_empty() => Ok((a.trim(), b.trim())),
        _ => Err(bad_input(format!(
            "{flag} {s}: expected NAME=VALUE, e.g. {flag} glazing=variants/triple.json"
        ))),
    }
}

fn read_patch(variant: &str, path: &Path) -> anyhow::Result<Value> {
    let text = std::fs::read_to_string(path).map_err(|e| {
        bad_input(format!(
            "variant {variant}: cannot read {}: {e}; check the path",
            path.display()
        ))
    })?;
    serde_json::from_str(&text).map_err(|e| {
        bad_input(format!(
            "variant {variant}: {}:{}:{}: not valid JSON: {e}",
            path.display(),
            e.line(),
            e.column()
        ))
    })
}

/// A patch of a variant: (part name, patch label, patch).
type Part = (String, String, Value);

fn stem(p: &str) -> String {
    Path::new(p)
        .file_stem()
        .map(|s| s.to_string_lossy().into_owned())
        .unwrap_or_else(|| p.to_string())
}

/// Runs the command.
pub fn run(args: CompareArgs) -> anyhow::Result<()> {
    let file = args.model.display().to_string();
    let text = std::fs::read_to_string(&args.model).map_err(|e| {
        bad_input(format!(
            "cannot read model file {file}: {e}; check the path"
        ))
    })?;
    let base_value: Value = serde_json::from_str(&text).map_err(|e| {
        bad_input(format!(
            "{file}:{}:{}: not valid JSON: {e}",
            e.line(),
            e.column()
        ))
    })?;
    if args.variants.is_empty() && args.grids.is_empty() {
        return Err(bad_input(
            "give at least one --variant NAME=PATCH.json or --grid KEY=P1.json,P2.json",
        ));
    }
    let mut costs: BTreeMap<String, f64> = BTreeMap::new();
    for c in &args.costs {
        let (n, v) = split_eq("--cost", c)?;
        let v: f64 = v
            .parse()
            .map_err(|_| bad_input(format!("--cost {c}: `{v}` is not a number")))?;
        if !(v.is_finite() && v >= 0.0) {
            return Err(bad_input(format!(
                "--cost {c}: the amount must be zero or more"
            )));
        }
        costs.insert(n.to_string(), v);
    }
    if let Some(p) = args.price {
        if !(p.is_finite() && p >= 0.0) {
            return Err(bad_input(format!(
                "--price {p}: the price must be zero or more"
            )));
        }
    }
    // (variant name, [(part name, patch label, patch)])
    let mut specs: Vec<(String, Vec<Part>)> = Vec::new();
    for v in &args.variants {
        let (name, path) = split_eq("--variant", v)?;
        specs.push((
            name.to_string(),
            vec![(
                name.to_string(),
                path.to_string(),
                read_patch(name, Path::new(path))?,
            )],
        ));
    }
    let mut lists = Vec::new();
    for g in &args.grids {
        let (key, entries) = split_eq("--grid", g)?;
        let mut list = Vec::new();
        for e in entries.split(',').map(str::trim).filter(|e| !e.is_empty()) {
            if e == "-" {
                list.push((format!("{key}=none"), None));
            } else {
                list.push((
                    format!("{key}={}", stem(e)),
                    Some((stem(e), e.to_string(), read_patch(&stem(e), Path::new(e))?)),
                ));
            }
        }
        lists.push(list);
    }
    if !lists.is_empty() {
        for combo in grid(&lists) {
            let name = combo
                .iter()
                .map(|(n, _)| n.clone())
                .collect::<Vec<_>>()
                .join(",");
            let parts = combo.into_iter().filter_map(|(_, p)| p).collect();
            specs.push((name, parts));
        }
    }
    let mut variants = Vec::new();
    let (m, h) = patched(&base_value, &file, &[]).map_err(bad_input)?;
    variants.push(Variant {
        name: "base".into(),
        parts: vec![],
        model: m,
        house: h,
        upgrade_cost: None,
    });
    for (name, parts) in specs {
        let patches: Vec<(String, Value)> = parts
            .iter()
            .map(|(_, label, v)| (label.clone(), v.clone()))
            .collect();
        let (m, h) = patched(&base_value, &file, &patches)
            .map_err(|e| bad_input(format!("variant {name}: {e}")))?;
        let cost = match costs.get(&name) {
            Some(c) => Some(*c),
            None => parts
                .iter()
                .map(|(n, _, _)| costs.get(n).copied())
                .sum::<Option<f64>>()
                .filter(|_| !parts.is_empty()),
        };
        variants.push(Variant {
            name,
            parts: parts.iter().map(|(_, l, _)| l.clone()).collect(),
            model: m,
            house: h,
            upgrade_cost: cost,
        });
    }
    let known: Vec<&str> = variants
        .iter()
        .map(|v| v.name.as_str())
        .chain(
            variants
                .iter()
                .flat_map(|v| v.parts.iter().map(|p| p.as_str())),
        )
        .collect();
    for n in costs.keys() {
        let part_names: Vec<String> = variants
            .iter()
            .flat_map(|v| v.parts.iter().map(|p| stem(p)))
            .collect();
        if !known.contains(&n.as_str()) && !part_names.contains(n) {
            return Err(bad_input(format!(
                "--cost {n}=…: no variant or patch is called `{n}`; names are {}",
                variants
                    .iter()
                    .map(|v| v.name.as_str())
                    .collect::<Vec<_>>()
                    .join(", ")
            )));
        }
    }
    let weather = load_weather(&args.period.weather)?;
    let opts = SimOptions {
        step_s: args.period.step as f64 * 60.0,
        from: args.period.from,
        to: args.period.to,
        ..SimOptions::default()
    };
    let bar = crate::progress::bar(variants.len() as u64, "variants", args.quiet);
    let cmp = compare_with_progress(&variants, &weather, &opts, args.price, &|| bar.inc(1));
    bar.finish_and_clear();
    let cmp = cmp.map_err(|e| match e.source {
        dwell_studies::StudyError::Option(_) => bad_input(e),
        _ => anyhow::Error::new(e),
    })?;
    let out = dwell_report::OutputDir::create(&args.out)?;
    let mut written = dwell_report::write_compare(&out, &cmp, &variants[0].house)?;
    // Drawn from the files just written, as `dwell chart` redraws them.
    written.extend(super::chart::draw_study(&out, args.quiet)?);
    if !args.quiet {
        print!("{}", table(&cmp));
        for w in &written {
            println!("wrote {}", w.display());
        }
    }
    Ok(())
}

fn opt(v: Option<f64>, d: usize) -> String {
    v.map(|x| format!("{x:.d$}")).unwrap_or_else(|| "-".into())
}

fn table(c: &Comparison) -> String {
    let mut o = format!(
        "{}: {} h from {} to {}\nweather: {}\n\n",
        c.model, c.hours, c.from, c.to, c.weather
    );
    let w = c
        .rows
        .iter()
        .map(|r| r.variant.chars().count())
        .max()
        .unwrap_or(8)
        .max(8)
        + 2;
    o.push_str(&format!(
        "{:<w$}{:>11}{:>10}{:>8}{:>9}{:>10}{:>9}{:>10}{:>10}{:>9}\n",
        "variant",
        "heat kWh",
        "Δ kWh",
        "Δ %",
        "peak W",
        "low occ°C",
        "h out",
        "money",
        "cost",
        "payback"
    ));
    for r in &c.rows {
        o.push_str(&format!(
            "{:<w$}{:>11.1}{:>10.1}{:>8}{:>9.0}{:>10}{:>9}{:>10}{:>10}{:>9}\n",
            r.variant,
            r.heating_kwh,
            r.change_kwh,
            opt(r.change_pct, 1),
            r.peak_w,
            opt(r.lowest_occupied_c, 1),
            r.hours_outside_band_h,
            opt(r.money, 2),
            opt(r.upgrade_cost, 0),
            opt(r.simple_payback_years, 1)
        ));
    }
    for n in &c.notes {
        o.push_str(&format!("note: {n}\n"));
    }
    for k in &c.cautions {
        o.push_str(&format!("caution: {k}\n"));
    }
    o
}

//! Option comparison: variants of a model, each a JSON Merge Patch (RFC 7386), run in
//! parallel over the same weather and set side by side.
//!
//! A variant's model is `merge_patch(base, p₁) … merge_patch(·, p_k)` on the model's JSON
//! value, read back with [`dwell_model::from_value`] under the label `"<model> + <patch>"`, so
//! it is validated exactly like a model file and its errors name the variant. A **grid** is
//! every combination of one patch from each of several option lists (a list may include "no
//! change").
//!
//! Money: purchased energy × price (the heaters' `price_per_kwh`, or one price for all).
//! Simple payback = upgrade cost / yearly saving, given only when the run is one full weather
//! year (a saving over a week says nothing about a year).

use dwell_model::{House, ModelError, ModelFile};
use dwell_weather::WeatherSeries;
use rayon::prelude::*;
use serde::{Deserialize, Serialize};
use serde_json::Value;

use crate::simulate::{simulate, SimOptions, StudyError};

/// A variant ready to run.
#[derive(Clone, Debug)]
pub struct Variant {
    /// Name shown in tables (`base` for the unchanged model).
    pub name: String,
    /// Names of the patches applied, in order.
    pub parts: Vec<String>,
    /// The patched model.
    pub model: ModelFile,
    /// Its compiled house.
    pub house: House,
    /// Upgrade cost (money), if given.
    pub upgrade_cost: Option<f64>,
}

/// Applies `patches` (label, patch) to the base model's JSON value and validates and compiles
/// the result; errors carry the label `"<file> + <patch> + …"`.
pub fn patched(
    base: &Value,
    file: &str,
    patches: &[(String, Value)],
) -> Result<(ModelFile, House), ModelError> {
    let mut v = base.clone();
    let mut label = file.to_string();
    for (name, p) in patches {
        dwell_model::patch::merge_patch(&mut v, p);
        label.push_str(" + ");
        label.push_str(name);
    }
    let m = dwell_model::from_value(v, &label)?;
    let h = dwell_model::compile(&m, &label)?;
    Ok((m, h))
}

/// Every combination of one entry from each list (the first list varies slowest).
pub fn grid<T: Clone>(lists: &[Vec<T>]) -> Vec<Vec<T>> {
    let mut out: Vec<Vec<T>> = vec![vec![]];
    for l in lists {
        out = out
            .iter()
            .flat_map(|prefix| {
                l.iter()
                    .map(move |x| [prefix.clone(), vec![x.clone()]].concat())
            })
            .collect();
    }
    out
}

/// One row of the comparison.
#[derive(Clone, Debug, Serialize, Deserialize)]
pub struct VariantRow {
    /// Variant name.
    pub variant: String,
    /// Patches applied.
    pub patches: Vec<String>,
    /// Heat delivered over the period (kWh).
    pub heating_kwh: f64,
    /// Change against the base (kWh, negative = saving).
    pub change_kwh: f64,
    /// Change against the base (%).
    pub change_pct: Option<f64>,
    /// Highest hourly whole-house heating (W).
    pub peak_w: f64,
    /// Lowest occupied air temperature over all zones with a band (°C).
    pub lowest_occupied_c: Option<f64>,
    /// Occupied hours outside the comfort band, summed over zones (h).
    pub hours_outside_band_h: usize,
    /// Purchased energy (kWh).
    pub purchased_kwh: f64,
    /// Money for the purchased energy over the period, if prices are known.
    pub money: Option<f64>,
    /// Money saved against the base over the period.
    pub money_saved: Option<f64>,
    /// Upgrade cost, if given.
    pub upgrade_cost: Option<f64>,
    /// Upgrade cost / yearly money saved (years), full-year runs only.
    pub simple_payback_years: Option<f64>,
}

/// The comparison.
#[derive(Clone, Debug, Serialize, Deserialize)]
pub struct Comparison {
    /// Base model name.
    pub model: String,
    /// Weather.
    pub weather: String,
    /// First and last stamps.
    pub from: String,
    /// Last stamp.
    pub to: String,
    /// Hours.
    pub hours: usize,
    /// Whether the run is one full year (money is then per year).
    pub full_year: bool,
    /// Price applied to every heater (money/kWh), if given.
    pub price_per_kwh: Option<f64>,
    /// Base first, then by heating, lowest first.
    pub rows: Vec<VariantRow>,
    /// Notes.
    pub notes: Vec<String>,
    /// Cautions.
    pub cautions: Vec<String>,
}

/// A failure of one variant.
#[derive(Debug, thiserror::Error)]
#[error("variant {variant}: {source}")]
pub struct VariantError {
    /// The variant.
    pub variant: String,
    /// Why.
    #[source]
    pub source: StudyError,
}

/// Runs `variants` (the first is the base) in parallel over `weather`.
pub fn compare(
    variants: &[Variant],
    weather: &WeatherSeries,
    opts: &SimOptions,
    price_per_kwh: Option<f64>,
) -> Result<Comparison, VariantError> {
    compare_with_progress(variants, weather, opts, price_per_kwh, &|| {})
}

/// [`compare`], calling `done` after each variant finishes (from any worker thread), so a
/// caller can show progress.
pub fn compare_with_progress(
    variants: &[Variant],
    weather: &WeatherSeries,
    opts: &SimOptions,
    price_per_kwh: Option<f64>,
    done: &(dyn Fn() + Sync),
) -> Result<Comparison, VariantError> {
    let results: Vec<_> = variants
        .par_iter()
        .map(|v| {
            let mut m = v.model.clone();
            if let Some(p) = price_per_kwh {
                m.heaters.iter_mut().for_each(|h| h.price_per_kwh = Some(p));
            }
            // Keep only the summary: the variant's hourly trajectories are dropped here,
            // on the worker thread, so memory holds one trajectory per thread at most.
            let r = simulate(&m, &v.house, weather, opts)
                .map(|r| r.summary)
                .map_err(|e| VariantError {
                    variant: v.name.clone(),
                    source: e,
                });
            done();
            r
        })
        .collect();
    let mut sums = Vec::new();
    for r in results {
        sums.push(r?);
    }
    let base = &sums[0];
    let full_year = weather.is_full_year() && opts.from.is_none() && opts.to.is_none();
    let mut rows: Vec<VariantRow> = variants
        .iter()
        .zip(&sums)
        .map(|(v, s)| {
            let comforts: Vec<_> = s.zones.iter().filter_map(|z| z.comfort.as_ref()).collect();
            let money_saved = match (base.total_cost, s.total_cost) {
                (Some(b), Some(c)) => Some(b - c),
                _ => None,
            };
            VariantRow {
                variant: v.name.clone(),
                patches: v.parts.clone(),
                heating_kwh: s.total_heating_kwh,
                change_kwh: s.total_heating_kwh - base.total_heating_kwh,
                change_pct: (base.total_heating_kwh > 1e-9).then(|| {
                    100.0 * (s.total_heating_kwh - base.total_heating_kwh) / base.total_heating_kwh
                }),
                peak_w: s.total_peak_heating_w,
                lowest_occupied_c: comforts
                    .iter()
                    .filter_map(|c| c.coldest_occupied_c)
                    .reduce(f64::min),
                hours_outside_band_h: comforts.iter().map(|c| c.hours_below + c.hours_above).sum(),
                purchased_kwh: s.total_purchased_kwh,
                money: s.total_cost,
                money_saved,
                upgrade_cost: v.upgrade_cost,
                simple_payback_years: match (full_year, v.upgrade_cost, money_saved) {
                    (true, Some(c), Some(s)) if s > 0.0 => Some(c / s),
                    _ => None,
                },
            }
        })
        .collect();
    rows[1..].sort_by(|a, b| {
        a.heating_kwh
            .partial_cmp(&b.heating_kwh)
            .unwrap_or(std::cmp::Ordering::Equal)
            .then(a.variant.cmp(&b.variant))
    });
    let mut notes = Vec::new();
    if !full_year {
        notes.push("the run is not one full weather year: money is over the period and no payback is given".into());
    }
    if base.total_cost.is_none() {
        notes.push("no price for every heater: give --price or price_per_kwh in the model for money and payback".into());
    }
    Ok(Comparison {
        model: base.model.clone(),
        weather: weather.source.clone(),
        from: base.from.clone(),
        to: base.to.clone(),
        hours: base.hours,
        full_year,
        price_per_kwh,
        rows,
        notes,
        cautions: vec![crate::CAUTION.to_string()],
    })
}

#[cfg(test)]
mod tests {
    use super::*;
    use serde_json::json;

    #[test]
    fn grid_is_every_combination() {
        let g = grid(&[vec!["a", "b"], vec!["x", "y", "z"]]);
        assert_eq!(g.len(), 6);
        assert_eq!(g[0], vec!["a", "x"]);
        assert_eq!(g[5], vec!["b", "z"]);
    }

    #[test]
    fn a_patch_that_breaks_the_model_names_the_variant() {
        let base = json!({"zones": [{"id": "a", "floor_area_m2": 10, "volume_m3": 25}]});
        let e = patched(
            &base,
            "m.json",
            &[(
                "bad.json".into(),
                json!({"zones": [{"id": "a", "floor_area_m2": -1, "volume_m3": 25}]}),
            )],
        )
        .unwrap_err();
        assert!(e.to_string().starts_with("m.json + bad.json"), "{e}");
    }
}

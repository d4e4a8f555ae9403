//! The fit: starting values, Levenberg–Marquardt, covariance, confidence intervals and the
//! identifiability verdicts.
//!
//! **Confidence intervals.** At the optimum θ̂ the covariance is estimated from the Jacobian
//! `J` of the residuals as `Σ = s²·(JᵀJ)⁻¹·f`, with `s² = SSR/(n − p)` (the classical
//! nonlinear least-squares approximation; Bates & Watts, *Nonlinear Regression Analysis and
//! Its Applications*, 1988, ch. 2 — from memory). Output-error residuals are often
//! autocorrelated; `f = (1 + ρ₁)/(1 − ρ₁)` for a positive lag-1 autocorrelation ρ₁ inflates
//! the variance as for AR(1) errors (the usual effective-sample-size correction, common
//! practice), else `f = 1`. A derived quantity `g(θ)` (HLC, a time constant) gets
//! `var g = ∇gᵀ Σ ∇g` (delta method); HLC and time constants are positive, so their intervals
//! are taken on the logarithm: `g·exp(±1.96·σ_ln g)`, 1.96 being the 97.5 % standard-normal
//! quantile. The aperture and the gain get `±1.96·σ`.

use nalgebra::DMatrix;

use crate::data::MeasuredData;
use crate::error::CalibrateError;
use crate::lm::levenberg_marquardt;
use crate::predict::{predict_into, time_constants_s};
use crate::stats::{residual_stats, ResidualStats};
use crate::structure::{Layout, Order, RcParams};

/// 97.5 % quantile of the standard normal distribution.
pub const Z95: f64 = 1.959_963_985;

/// Options of a fit.
#[derive(Clone, Debug)]
pub struct FitOptions {
    /// Iteration limit of Levenberg–Marquardt (default 200).
    pub max_iter: usize,
}

impl Default for FitOptions {
    fn default() -> Self {
        FitOptions { max_iter: 200 }
    }
}

/// A value with its 95 % confidence interval.
#[derive(Clone, Copy, Debug, serde::Serialize)]
pub struct Estimate {
    /// Best estimate.
    pub value: f64,
    /// Lower end of the 95 % interval.
    pub lo95: f64,
    /// Upper end of the 95 % interval.
    pub hi95: f64,
}

impl Estimate {
    /// True if `x` lies in the interval.
    pub fn covers(&self, x: f64) -> bool {
        self.lo95 <= x && x <= self.hi95
    }
}

/// One fitted parameter with its standard error.
#[derive(Clone, Debug, serde::Serialize)]
pub struct ParamReport {
    /// Name (`ln_` = fitted as a logarithm).
    pub name: String,
    /// Fitted θ value.
    pub theta: f64,
    /// Standard error of θ (for `ln_` parameters ≈ relative standard error of the quantity).
    pub std_error: f64,
    /// False if the data do not pin this parameter down (see [`Calibration::unidentified`]).
    pub identified: bool,
}

/// The result of calibrating one structure.
#[derive(Clone, Debug, serde::Serialize)]
pub struct Calibration {
    /// Model order.
    pub order: u32,
    /// Fitted physical parameters.
    pub params: RcParams,
    /// Heat-loss coefficient (W/K).
    pub hlc_w_k: Estimate,
    /// Time constants, longest first (h).
    pub time_constants_h: Vec<Estimate>,
    /// Effective solar aperture (m²), if the data carry irradiance.
    pub aperture_m2: Option<Estimate>,
    /// Unmeasured constant gain (W).
    pub gain_w: Estimate,
    /// Every fitted parameter.
    pub parameters: Vec<ParamReport>,
    /// Names of parameters the data cannot identify.
    pub unidentified: Vec<String>,
    /// Residual statistics (measured − fitted).
    pub residuals: ResidualStats,
    /// Variance inflation applied for autocorrelated residuals (1 = none).
    pub ci_inflation: f64,
    /// Levenberg–Marquardt iterations.
    pub iterations: usize,
    /// True if the optimiser met a convergence test.
    pub converged: bool,
    /// Warnings about the data and the fit, in words.
    pub warnings: Vec<String>,
    /// Fitted indoor temperature at every instant (°C).
    #[serde(skip)]
    pub fitted_c: Vec<f64>,
}

fn mean(x: &[f64]) -> f64 {
    x.iter().sum::<f64>() / x.len().max(1) as f64
}

fn sd(x: &[f64]) -> f64 {
    let m = mean(x);
    (x.iter().map(|v| (v - m) * (v - m)).sum::<f64>() / x.len().max(1) as f64).sqrt()
}

/// Starting values of a one-node model from daily heat balances,
/// `∫P dt = C·ΔTi + H·∫(Ti − To) dt − A_s·∫I dt − Q₀·Δt`, by linear least squares; falls back
/// to plain ratios when the regression is not physical. Returns (H, C, A_s, Q₀).
fn one_node_start(d: &MeasuredData) -> (f64, f64, f64, f64) {
    let per_day = ((86_400.0 / d.step_s).round() as usize).max(1);
    let solar = d.solar_w_m2.is_some();
    let mut rows: Vec<Vec<f64>> = Vec::new();
    let mut rhs = Vec::new();
    let valid: Vec<usize> = (0..d.len()).filter(|&k| !d.indoor_c[k].is_nan()).collect();
    // Indoor at gaps: nearest earlier valid value (only for this rough start).
    let mut ti = d.indoor_c.clone();
    for k in 1..ti.len() {
        if ti[k].is_nan() {
            ti[k] = ti[k - 1];
        }
    }
    let mut a = 0;
    while a + per_day < d.len() {
        let b = a + per_day;
        let mut sp = 0.0;
        let mut sdt = 0.0;
        let mut si = 0.0;
        for k in a + 1..=b {
            sp += d.heating_w[k] * d.step_s;
            sdt += 0.5 * ((ti[k] - d.outdoor_c[k]) + (ti[k - 1] - d.outdoor_c[k - 1])) * d.step_s;
            si += d.solar_w_m2.as_ref().map_or(0.0, |s| s[k]) * d.step_s;
        }
        let mut row = vec![ti[b] - ti[a], sdt];
        if solar {
            row.push(-si);
        }
        row.push(-((b - a) as f64) * d.step_s);
        rows.push(row);
        rhs.push(sp);
        a = b;
    }
    let mean_dt = mean(
        &valid
            .iter()
            .map(|&k| d.indoor_c[k] - d.outdoor_c[k])
            .collect::<Vec<_>>(),
    );
    let fallback_h = (mean(&d.heating_w) / mean_dt.max(1.0)).clamp(5.0, 5000.0);
    let q = if solar { 4 } else { 3 };
    if rows.len() > q {
        let m = DMatrix::from_fn(rows.len(), q, |i, j| rows[i][j]);
        let y = nalgebra::DVector::from_vec(rhs);
        if let Ok(x) = m.clone().svd(true, true).solve(&y, 1e-12) {
            let (c, h) = (x[0], x[1]);
            let (aper, gain) = if solar { (x[2], x[3]) } else { (0.0, x[2]) };
            if h.is_finite() && h > 1.0 && h < 1e5 {
                let c = if c.is_finite() && c > h * 3600.0 && c < h * 3600.0 * 1000.0 {
                    c
                } else {
                    h * 30.0 * 3600.0
                };
                return (h, c, aper.clamp(0.0, 100.0), gain.clamp(-5.0 * h, 5.0 * h));
            }
        }
    }
    (fallback_h, fallback_h * 30.0 * 3600.0, 0.0, 0.0)
}

fn starts(order: Order, d: &MeasuredData) -> Vec<RcParams> {
    let (h, c, aper, gain) = one_node_start(d);
    let ti0 = d.indoor_c[0];
    let to0 = d.outdoor_c[0];
    let base = RcParams {
        order,
        h_ie_w_k: h,
        h_eo_w_k: 0.0,
        h_im_w_k: 0.0,
        c_i_j_k: c,
        c_e_j_k: 0.0,
        c_m_j_k: 0.0,
        aperture_m2: aper,
        gain_w: gain,
        initial_c: vec![],
    };
    match order {
        Order::One => vec![base],
        Order::Two | Order::Three => {
            let mut out = Vec::new();
            for (air_share, ie_ratio) in [(0.1, 6.0), (0.03, 3.0), (0.3, 12.0)] {
                let h_ie = ie_ratio * h;
                let h_eo = h_ie * h / (h_ie - h);
                let te0 = to0 + h * (ti0 - to0) / h_eo;
                let mut p = base.clone();
                p.h_ie_w_k = h_ie;
                p.h_eo_w_k = h_eo;
                p.c_i_j_k = air_share * c;
                if order == Order::Two {
                    p.c_e_j_k = (1.0 - air_share) * c;
                    p.initial_c = vec![te0];
                } else {
                    p.c_e_j_k = 0.7 * (1.0 - air_share) * c;
                    p.c_m_j_k = 0.3 * (1.0 - air_share) * c;
                    p.h_im_w_k = 3.0 * h;
                    p.initial_c = vec![te0, ti0];
                }
                out.push(p);
            }
            out
        }
    }
}

/// `(JᵀJ)⁻¹` by the eigen-decomposition of the diagonally scaled matrix, with eigenvalues
/// below 10⁻¹³ of the largest set to 10⁻³⁰⁰: a direction the data do not constrain then gets
/// an enormous variance instead of being dropped (as a pseudo-inverse would), so every
/// parameter along it is reported as not identified.
fn inverse_keeping_null_directions(jtj: &DMatrix<f64>) -> DMatrix<f64> {
    let p = jtj.nrows();
    let d: Vec<f64> = (0..p).map(|i| jtj[(i, i)].max(1e-300).sqrt()).collect();
    let scaled = DMatrix::from_fn(p, p, |i, j| jtj[(i, j)] / (d[i] * d[j]));
    let eig = scaled.symmetric_eigen();
    let lmax = eig.eigenvalues.amax().max(1e-300);
    let inv_l = eig
        .eigenvalues
        .map(|l| 1.0 / if l > 1e-13 * lmax { l } else { 1e-300 });
    let inv = &eig.eigenvectors * DMatrix::from_diagonal(&inv_l) * eig.eigenvectors.transpose();
    DMatrix::from_fn(p, p, |i, j| inv[(i, j)] / (d[i] * d[j]))
}

/// Fits a structure of `order` to `data` and reports estimates, intervals and diagnostics.
pub fn calibrate(
    data: &MeasuredData,
    order: Order,
    opts: &FitOptions,
) -> Result<Calibration, CalibrateError> {
    let layout = Layout::new(order, data.solar_w_m2.is_some());
    let p = layout.len();
    let valid: Vec<usize> = (1..data.len())
        .filter(|&k| !data.indoor_c[k].is_nan())
        .collect();
    if valid.len() < p + 10 {
        return Err(CalibrateError::Data {
            source_name: data.source.clone(),
            message: format!(
                "{} indoor readings after the first; an order-{} fit of {p} parameters needs at least {} (give more data or a lower --order)",
                valid.len(),
                order.number(),
                p + 10
            ),
        });
    }
    let mut warnings = Vec::new();
    let days = data.duration_s() / 86_400.0;
    if days < 3.0 {
        warnings.push(format!("too short: {days:.1} days of data; time constants of a house are ~10–100 h (common practice), so give at least a week"));
    }
    let heat_sd = sd(&data.heating_w);
    if heat_sd < 0.02 * mean(&data.heating_w).abs() + 5.0 {
        warnings.push(format!("no heating variation: the heating power hardly changes (standard deviation {heat_sd:.1} W); the heat-loss coefficient then rests on outdoor-temperature changes alone, and the unmeasured gain cannot be told from it if those are small"));
    }
    let out_sd = sd(&data.outdoor_c);
    if out_sd < 1.0 {
        warnings.push(format!("flat outdoor temperature: its standard deviation is {out_sd:.2} K (< 1 K); the heat-loss coefficient then rests on heating changes alone"));
    }

    let mut buf = vec![0.0; data.len()];
    let mut resid = |th: &[f64]| -> Option<Vec<f64>> {
        let pr = layout.params(th);
        if th.iter().any(|t| !t.is_finite()) {
            return None;
        }
        predict_into(&pr, data, &mut buf).ok()?;
        let r: Vec<f64> = valid.iter().map(|&k| buf[k] - data.indoor_c[k]).collect();
        r.iter().all(|x| x.is_finite()).then_some(r)
    };
    let mut best: Option<crate::lm::LmResult> = None;
    for s in starts(order, data) {
        let th0 = layout.theta(&s);
        if let Some(res) = levenberg_marquardt(&mut resid, &th0, opts.max_iter) {
            let ss: f64 = res.residuals.iter().map(|x| x * x).sum();
            if best
                .as_ref()
                .is_none_or(|b| ss < b.residuals.iter().map(|x| x * x).sum())
            {
                best = Some(res);
            }
        }
    }
    let best = best.ok_or_else(|| CalibrateError::Data {
        source_name: data.source.clone(),
        message: "no starting point could be simulated; check that the data are in °C and W".into(),
    })?;
    let th = best.theta.clone();
    let params = layout.params(&th);
    let mut fitted = vec![0.0; data.len()];
    predict_into(&params, data, &mut fitted)?;
    let step_per_day = (86_400.0 / data.step_s).round() as usize;
    let residuals = residual_stats(data, &fitted, step_per_day);
    let n = best.residuals.len();
    let ssr: f64 = best.residuals.iter().map(|x| x * x).sum();
    let s2 = ssr / (n - p).max(1) as f64;
    let inflation = if residuals.lag1_autocorrelation > 0.0 {
        (1.0 + residuals.lag1_autocorrelation) / (1.0 - residuals.lag1_autocorrelation).max(1e-3)
    } else {
        1.0
    };
    let jtj = best.jacobian.transpose() * &best.jacobian;
    let cov = inverse_keeping_null_directions(&jtj) * (s2 * inflation);
    let var_of = |g: &[f64]| -> f64 {
        let mut v = 0.0;
        for i in 0..p {
            for j in 0..p {
                v += g[i] * cov[(i, j)] * g[j];
            }
        }
        v.max(0.0)
    };
    let log_est = |value: f64, g: &[f64]| {
        let s = var_of(g).sqrt();
        Estimate {
            value,
            lo95: value * (-Z95 * s).exp(),
            hi95: value * (Z95 * s).exp(),
        }
    };
    let lin_est = |value: f64, idx: usize| {
        let s = cov[(idx, idx)].max(0.0).sqrt();
        Estimate {
            value,
            lo95: value - Z95 * s,
            hi95: value + Z95 * s,
        }
    };
    // HLC: ∂ln HLC/∂ln h_ie = h_eo/(h_ie + h_eo), ∂/∂ln h_eo = h_ie/(h_ie + h_eo).
    let mut g = vec![0.0; p];
    match order {
        Order::One => g[0] = 1.0,
        _ => {
            let sum = params.h_ie_w_k + params.h_eo_w_k;
            g[0] = params.h_eo_w_k / sum;
            g[1] = params.h_ie_w_k / sum;
        }
    }
    let hlc = log_est(params.hlc_w_k(), &g);
    // Time constants: gradient of ln τ by forward differences.
    let tau = time_constants_s(&params, data.step_s)?;
    let mut grads = vec![vec![0.0; p]; tau.len()];
    for c in 0..p {
        let mut t2 = th.clone();
        let h = 1e-6 * th[c].abs().max(1.0);
        t2[c] += h;
        let tau2 = time_constants_s(&layout.params(&t2), data.step_s)?;
        for (i, g) in grads.iter_mut().enumerate() {
            g[c] = (tau2[i].ln() - tau[i].ln()) / h;
        }
    }
    let time_constants_h: Vec<Estimate> = tau
        .iter()
        .zip(grads.iter())
        .map(|(t, g)| {
            let e = log_est(*t, g);
            Estimate {
                value: e.value / 3600.0,
                lo95: e.lo95 / 3600.0,
                hi95: e.hi95 / 3600.0,
            }
        })
        .collect();
    let idx = |name: &str| {
        layout
            .names
            .iter()
            .position(|n| *n == name)
            .expect("parameter in layout")
    };
    let aperture = layout
        .solar
        .then(|| lin_est(params.aperture_m2, idx("aperture_m2")));
    let gain = lin_est(params.gain_w, idx("gain_w"));
    let mut parameters = Vec::new();
    let mut unidentified = Vec::new();
    for (i, name) in layout.names.iter().enumerate() {
        let se = cov[(i, i)].max(0.0).sqrt();
        // A log parameter known to better than a factor e^0.5 ≈ 1.65 (1 σ) is identified; a
        // gain when its standard error is worth < 2.5 K of indoor–outdoor difference (σ < 2.5·HLC);
        // the aperture when σ < max(0.5 m², half its value); an initial temperature when σ < 5 K.
        let identified = if name.starts_with("ln_") {
            se < 0.5
        } else if *name == "aperture_m2" {
            se < 0.5f64.max(0.5 * params.aperture_m2.abs())
        } else if *name == "gain_w" {
            se < 2.5 * hlc.value.max(1.0)
        } else {
            se < 5.0
        };
        if !identified || !se.is_finite() {
            unidentified.push(name.to_string());
        }
        parameters.push(ParamReport {
            name: name.to_string(),
            theta: th[i],
            std_error: se,
            identified: identified && se.is_finite(),
        });
    }
    let hlc_rel = (hlc.hi95 / hlc.lo95).ln() / (2.0 * Z95);
    if hlc_rel > 0.25 {
        warnings.push(format!(
            "the heat-loss coefficient is poorly identified: its 95 % interval is {:.0} … {:.0} W/K; give longer data with varied heating (e.g. days at different powers) and a spell of colder weather",
            hlc.lo95, hlc.hi95
        ));
    }
    if !unidentified.is_empty() {
        warnings.push(format!("the data cannot identify: {} (standard errors in the report); a lower --order may suit these data better", unidentified.join(", ")));
    }
    if !residuals.white {
        warnings.push(format!(
            "residuals are autocorrelated (lag-1 {:.2}): the model misses some dynamics; intervals were widened by a factor {:.2} on the variance",
            residuals.lag1_autocorrelation, inflation
        ));
    }
    let longest_h = time_constants_h.first().map_or(0.0, |t| t.value);
    if days * 24.0 < 2.0 * longest_h && longest_h.is_finite() {
        warnings.push(format!("too short for the longest time constant: {days:.1} days of data for τ = {longest_h:.0} h; give at least twice τ"));
    }
    if !best.converged {
        warnings.push(format!("the optimiser stopped at its limit of {} iterations without meeting a convergence test", opts.max_iter));
    }
    Ok(Calibration {
        order: order.number(),
        params,
        hlc_w_k: hlc,
        time_constants_h,
        aperture_m2: aperture,
        gain_w: gain,
        parameters,
        unidentified,
        residuals,
        ci_inflation: inflation,
        iterations: best.iterations,
        converged: best.converged,
        warnings,
        fitted_c: fitted,
    })
}

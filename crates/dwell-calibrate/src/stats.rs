//! Residual statistics of a fit (measured − fitted indoor temperature).

use crate::data::MeasuredData;

/// Summary of the residuals `e_k = measured_k − fitted_k` (K) over instants with a reading.
#[derive(Clone, Debug, serde::Serialize)]
pub struct ResidualStats {
    /// Number of residuals.
    pub count: usize,
    /// Root-mean-square error (K).
    pub rmse_k: f64,
    /// Mean residual (K); non-zero means a bias.
    pub mean_k: f64,
    /// Largest absolute residual (K).
    pub max_abs_k: f64,
    /// Lag-1 autocorrelation (one interval).
    pub lag1_autocorrelation: f64,
    /// Autocorrelation at a lag of one day.
    pub lag_day_autocorrelation: f64,
    /// True if |lag-1 autocorrelation| < 1.96/√n, the 95 % band of white noise (Box & Jenkins,
    /// *Time Series Analysis*, large-lag standard error 1/√n — from memory).
    pub white: bool,
}

/// Autocorrelation of `e` (NaN = missing) at `lag`, over pairs where both are present.
pub fn autocorrelation(e: &[f64], lag: usize) -> f64 {
    let vals: Vec<f64> = e.iter().copied().filter(|x| !x.is_nan()).collect();
    if vals.len() < 3 || lag >= e.len() {
        return 0.0;
    }
    let m = vals.iter().sum::<f64>() / vals.len() as f64;
    let var = vals.iter().map(|x| (x - m) * (x - m)).sum::<f64>() / vals.len() as f64;
    if var <= 0.0 {
        return 0.0;
    }
    let mut s = 0.0;
    let mut n = 0;
    for k in lag..e.len() {
        if !e[k].is_nan() && !e[k - lag].is_nan() {
            s += (e[k] - m) * (e[k - lag] - m);
            n += 1;
        }
    }
    if n == 0 {
        0.0
    } else {
        s / n as f64 / var
    }
}

/// Statistics of `data.indoor_c − fitted` over instants 1.. with a reading.
pub fn residual_stats(data: &MeasuredData, fitted: &[f64], per_day: usize) -> ResidualStats {
    let e: Vec<f64> = (0..data.len())
        .map(|k| {
            if k == 0 {
                f64::NAN
            } else {
                data.indoor_c[k] - fitted[k]
            }
        })
        .collect();
    let v: Vec<f64> = e.iter().copied().filter(|x| !x.is_nan()).collect();
    let n = v.len().max(1) as f64;
    let lag1 = autocorrelation(&e, 1);
    ResidualStats {
        count: v.len(),
        rmse_k: (v.iter().map(|x| x * x).sum::<f64>() / n).sqrt(),
        mean_k: v.iter().sum::<f64>() / n,
        max_abs_k: v.iter().fold(0.0, |a, x| a.max(x.abs())),
        lag1_autocorrelation: lag1,
        lag_day_autocorrelation: autocorrelation(&e, per_day),
        white: lag1.abs() < 1.96 / n.sqrt(),
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn autocorrelation_of_alternating_and_constant_trend() {
        // +1, −1, +1, …: lag-1 autocorrelation −1 (definition), lag 2 +1.
        let e: Vec<f64> = (0..100)
            .map(|k| if k % 2 == 0 { 1.0 } else { -1.0 })
            .collect();
        assert!((autocorrelation(&e, 1) + 1.0).abs() < 0.02);
        assert!((autocorrelation(&e, 2) - 1.0).abs() < 0.03);
        let mut g = e.clone();
        g[5] = f64::NAN;
        assert!(autocorrelation(&g, 1) < -0.9);
    }
}

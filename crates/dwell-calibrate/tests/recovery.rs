//! Fits to invented data from known parameters: recovery, prediction of a held-out week from
//! a higher-order house, and the coverage of the 95 % interval.

use dwell_calibrate::predict::{predict, time_constants_s};
use dwell_calibrate::synth::{synth_measured, SynthSpec};
use dwell_calibrate::{calibrate, FitOptions, Layout, Order, RcParams};

fn truth(order: Order) -> RcParams {
    // An invented house: HLC ≈ 180 W/K, aperture 3 m², 150 W of unmeasured gains.
    let lay = Layout::new(order, true);
    let th: Vec<f64> = match order {
        Order::One => vec![180f64.ln(), 18e6f64.ln(), 3.0, 150.0],
        Order::Two => vec![
            900f64.ln(),
            225f64.ln(),
            4e6f64.ln(),
            30e6f64.ln(),
            3.0,
            150.0,
            12.0,
        ],
        Order::Three => vec![
            900f64.ln(),
            225f64.ln(),
            600f64.ln(),
            3e6f64.ln(),
            30e6f64.ln(),
            12e6f64.ln(),
            3.0,
            150.0,
            12.0,
            19.0,
        ],
    };
    lay.params(&th)
}

#[test]
fn known_parameters_recovered_hlc_5pct_tau_10pct() {
    for order in [Order::One, Order::Two] {
        let t = truth(order);
        let spec = SynthSpec {
            days: 28.0,
            step_s: 1800.0,
            noise_sd_k: 0.1,
            missing_fraction: 0.05,
            seed: 7,
            ..Default::default()
        };
        let (data, _) = synth_measured(&t, 19.0, &spec).unwrap();
        let cal = calibrate(&data, order, &FitOptions::default()).unwrap();
        let hlc_err = cal.hlc_w_k.value / t.hlc_w_k() - 1.0;
        // Acceptance from issue 7: HLC within 5 %, time constants within 10 %.
        assert!(
            hlc_err.abs() < 0.05,
            "order {order:?}: HLC {} vs {} ({hlc_err:+.3})",
            cal.hlc_w_k.value,
            t.hlc_w_k()
        );
        let tau_true = time_constants_s(&t, 1800.0).unwrap();
        for (est, tr) in cal.time_constants_h.iter().zip(tau_true.iter()) {
            let e = est.value * 3600.0 / tr - 1.0;
            assert!(
                e.abs() < 0.10,
                "order {order:?}: τ {} h vs {} h ({e:+.3})",
                est.value,
                tr / 3600.0
            );
        }
        // Noise 0.1 K (invented): the residual RMSE is the noise, within 10 %.
        assert!(
            (cal.residuals.rmse_k / 0.1 - 1.0).abs() < 0.1,
            "rmse {}",
            cal.residuals.rmse_k
        );
        assert!(cal.unidentified.is_empty(), "{:?}", cal.unidentified);
        eprintln!(
            "order {:?}: HLC {:.2} ({:.2} … {:.2}) true {:.2}; τ {:?} h; {} iterations",
            order,
            cal.hlc_w_k.value,
            cal.hlc_w_k.lo95,
            cal.hlc_w_k.hi95,
            t.hlc_w_k(),
            cal.time_constants_h
                .iter()
                .map(|e| e.value)
                .collect::<Vec<_>>(),
            cal.iterations
        );
    }
}

#[test]
fn second_order_fit_of_a_third_order_house_predicts_a_held_out_week() {
    let t = truth(Order::Three);
    let spec = SynthSpec {
        days: 28.0,
        step_s: 3600.0,
        noise_sd_k: 0.1,
        seed: 11,
        ..Default::default()
    };
    let (data, clean) = synth_measured(&t, 19.0, &spec).unwrap();
    let split = 21 * 24;
    let train = data.slice(0, split + 1);
    let cal = calibrate(&train, Order::Two, &FitOptions::default()).unwrap();
    // Predict the last week from the fitted model, starting from the fitted states at the split:
    // run the fit over all 28 days with the fitted parameters and compare the last week.
    let all = predict(&cal.params, &data).unwrap();
    let e: Vec<f64> = (split + 1..data.len()).map(|k| all[k] - clean[k]).collect();
    let rmse = (e.iter().map(|x| x * x).sum::<f64>() / e.len() as f64).sqrt();
    let max = e.iter().fold(0.0f64, |a, x| a.max(x.abs()));
    eprintln!(
        "held-out week: RMSE {rmse:.3} K, max {max:.3} K; HLC {:.1} vs {:.1}",
        cal.hlc_w_k.value,
        t.hlc_w_k()
    );
    // Stated error for this invented house: RMSE below 0.1 K and no hour off by more than 0.3 K (noise-free truth).
    assert!(rmse < 0.1 && max < 0.3, "rmse {rmse}, max {max}");
    assert!((cal.hlc_w_k.value / t.hlc_w_k() - 1.0).abs() < 0.05);
}

#[test]
fn hlc_interval_coverage_over_seeded_repetitions() {
    let t = truth(Order::One);
    let reps = 40;
    let mut covered = 0;
    for seed in 0..reps {
        let spec = SynthSpec {
            days: 10.0,
            step_s: 3600.0,
            noise_sd_k: 0.15,
            seed: 100 + seed,
            ..Default::default()
        };
        let (data, _) = synth_measured(&t, 19.0, &spec).unwrap();
        let cal = calibrate(&data, Order::One, &FitOptions::default()).unwrap();
        if cal.hlc_w_k.covers(t.hlc_w_k()) {
            covered += 1;
        }
    }
    eprintln!("coverage of the 95 % HLC interval: {covered}/{reps}");
    // Nominal 95 %: with 40 repetitions, fewer than 34 covered has binomial probability ≈ 1.4 %
    // if the intervals are right (binomial(40, 0.95), computed), so 34 is the bar.
    assert!(covered >= 34, "coverage {covered}/{reps}");
}

#[test]
fn flat_inputs_are_reported_as_unidentifiable() {
    let t = truth(Order::One);
    let spec = SynthSpec {
        days: 2.0,
        step_s: 3600.0,
        heating_max_w: 0.0,
        solar: false,
        seed: 3,
        ..Default::default()
    };
    let (mut data, _) = synth_measured(&t, 19.0, &spec).unwrap();
    for v in data.outdoor_c.iter_mut() {
        *v = 5.0;
    }
    for v in data.heating_w.iter_mut() {
        *v = 1500.0;
    }
    let cal = calibrate(&data, Order::One, &FitOptions::default()).unwrap();
    let w = cal.warnings.join("\n");
    assert!(w.contains("too short"), "{w}");
    assert!(w.contains("no heating variation"), "{w}");
    assert!(w.contains("flat outdoor temperature"), "{w}");
    assert!(!cal.unidentified.is_empty(), "{w}");
}

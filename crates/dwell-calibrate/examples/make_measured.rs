//! Writes the INVENTED measured-data samples in `zones-examples/measured/` from known
//! parameters plus seeded noise. Run from the repository root:
//!
//! ```text
//! cargo run -p dwell-calibrate --example make_measured
//! ```

use dwell_calibrate::synth::{synth_measured, SynthSpec};
use dwell_calibrate::{Layout, Order};

fn main() -> Result<(), Box<dyn std::error::Error>> {
    std::fs::create_dir_all("zones-examples/measured")?;
    let samples = [
        (
            "invented-terrace-30min.csv",
            "an invented terraced house, 2R2C truth: H_ie 900, H_eo 225 W/K (HLC 180 W/K), C_i 4 MJ/K, C_e 30 MJ/K, aperture 3 m², unmeasured gain 150 W",
            Layout::new(Order::Two, true).params(&[900f64.ln(), 225f64.ln(), 4e6f64.ln(), 30e6f64.ln(), 3.0, 150.0, 12.0]),
            SynthSpec { days: 28.0, step_s: 1800.0, noise_sd_k: 0.1, missing_fraction: 0.03, seed: 2025, ..Default::default() },
        ),
        (
            "invented-cabin-15min.csv",
            "an invented timber cabin, 1R1C truth: H 60 W/K, C 4 MJ/K (τ 18.5 h), unmeasured gain 80 W, no irradiance column",
            Layout::new(Order::One, false).params(&[60f64.ln(), 4e6f64.ln(), 80.0]),
            SynthSpec { days: 14.0, step_s: 900.0, heating_max_w: 1500.0, solar: false, noise_sd_k: 0.1, seed: 7, ..Default::default() },
        ),
    ];
    for (name, what, truth, spec) in samples {
        let (data, _) = synth_measured(&truth, 19.0, &spec)?;
        let comments = vec![
            "INVENTED measured data (synthetic, not a real house): made by `cargo run -p dwell-calibrate --example make_measured`".to_string(),
            format!("truth: {what}"),
            format!("noise: Gaussian, standard deviation {} K on indoor_c, seed {}; {:.0} % of indoor readings dropped as gaps", spec.noise_sd_k, spec.seed, spec.missing_fraction * 100.0),
            "indoor_c, outdoor_c at the stamp; heating_w, solar_w_m2 mean over the interval ending at the stamp".to_string(),
        ];
        std::fs::write(
            format!("zones-examples/measured/{name}"),
            data.to_csv(&comments),
        )?;
        println!("wrote zones-examples/measured/{name}");
    }
    Ok(())
}

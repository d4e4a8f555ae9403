//! Any bytes as a weather file: reading must return `Ok` or an error, never panic; a file that
//! reads must also give a sun table.
#![no_main]

use libfuzzer_sys::fuzz_target;

fuzz_target!(|data: &[u8]| {
    let Ok(text) = std::str::from_utf8(data) else { return };
    let opts = dwell_weather::ReadOptions { fill_gaps_max_h: Some(6), ..Default::default() };
    if let Ok(w) = dwell_weather::parse_weather(text, "fuzz.csv", &opts) {
        let site = dwell_weather::Site { latitude_deg: 51.5, longitude_deg: -3.5, elevation_m: 40.0, albedo: 0.2 };
        let sun = dwell_weather::SunTable::new(&w, &site);
        let _ = sun.plane(90.0, 180.0, dwell_weather::SkyModel::HayDavies);
    }
});

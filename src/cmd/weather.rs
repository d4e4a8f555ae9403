//! `dwell weather …`: summarise a weather file, show the sun it implies on a plane, and
//! synthesise invented climates.

use std::io::Write;
use std::path::{Path, PathBuf};

use anyhow::Context;
use dwell_weather::synth::{self, ClimateParams};
use dwell_weather::{
    default_site, default_weather, format_stamp, read_weather, summary, write_atomic, ColumnMap,
    IrradianceUnit, ReadOptions, Site, SkyModel, SunTable, TemperatureUnit, WeatherError,
    WeatherSeries, DEFAULT_ALBEDO,
};

use crate::exit::bad_input;

/// Weather subcommands (boxed: their argument structs are large).
#[derive(clap::Subcommand)]
pub enum WeatherCommand {
    /// Print monthly means, heating degree-days, a design temperature and solar totals
    Summary(Box<SummaryArgs>),
    /// Write the sun's position and the irradiance on one plane, hour by hour, as CSV
    Sun(Box<SunArgs>),
    /// Write a reproducible year of weather for an invented climate
    Synth(Box<SynthArgs>),
}

/// How to read a weather file that is not in dwell's own column names or units.
#[derive(clap::Args, Debug, Clone)]
pub struct ReadArgs {
    /// Name of the time column [default: time]
    #[arg(long, value_name = "NAME")]
    time_col: Option<String>,
    /// Name of the air temperature column [default: air_c]
    #[arg(long, value_name = "NAME")]
    air_col: Option<String>,
    /// Name of the global horizontal irradiance column [default: ghi_w_m2]
    #[arg(long, value_name = "NAME")]
    ghi_col: Option<String>,
    /// Name of the diffuse horizontal irradiance column [default: dhi_w_m2]
    #[arg(long, value_name = "NAME")]
    dhi_col: Option<String>,
    /// Name of the direct normal irradiance column [default: dni_w_m2]
    #[arg(long, value_name = "NAME")]
    dni_col: Option<String>,
    /// Name of the ground temperature column [default: ground_c]
    #[arg(long, value_name = "NAME")]
    ground_col: Option<String>,
    /// Name of the wind speed column [default: wind_m_s]
    #[arg(long, value_name = "NAME")]
    wind_col: Option<String>,
    /// Unit of the temperature columns: C, F or K
    #[arg(long, value_name = "UNIT", default_value = "C")]
    temp_unit: TemperatureUnit,
    /// Unit of the irradiance columns: W/m2 (hour means, = Wh/m2) or kJ/m2 (per hour)
    #[arg(long, value_name = "UNIT", default_value = "W/m2")]
    irradiance_unit: IrradianceUnit,
    /// UTC offset of stamps written without one, e.g. +01:00 (stamps must otherwise carry one)
    #[arg(long = "assume-offset", value_name = "OFFSET")]
    assume_offset: Option<String>,
    /// Fill runs of up to N missing hours linearly (default: no filling, gaps are errors)
    #[arg(long, value_name = "N")]
    fill_gaps: Option<usize>,
}

impl ReadArgs {
    fn options(&self) -> anyhow::Result<ReadOptions> {
        let columns = ColumnMap {
            time: self.time_col.clone(),
            air: self.air_col.clone(),
            ghi: self.ghi_col.clone(),
            dhi: self.dhi_col.clone(),
            dni: self.dni_col.clone(),
            ground: self.ground_col.clone(),
            wind: self.wind_col.clone(),
        };
        let assume_offset = match &self.assume_offset {
            None => None,
            Some(s) => Some(
                dwell_weather::parse_stamp(&format!("2000-01-01T00:00{s}"), None)
                    .map(|t| *t.offset())
                    .map_err(|_| {
                        bad_input(format!(
                            "--assume-offset {s}: not a UTC offset; write it as +01:00 or -05:00"
                        ))
                    })?,
            ),
        };
        Ok(ReadOptions {
            columns,
            temperature_unit: self.temp_unit,
            irradiance_unit: self.irradiance_unit,
            assume_offset,
            fill_gaps_max_h: self.fill_gaps,
            ..ReadOptions::default()
        })
    }

    /// Reads `file`, or the built-in default weather when none is given.
    fn read(&self, file: Option<&Path>) -> anyhow::Result<WeatherSeries> {
        match file {
            None => Ok(default_weather()),
            Some(f) => read_weather(f, &self.options()?).map_err(weather_error),
        }
    }
}

/// Maps a library error to the exit code: the user's input (2) or the system (1).
fn weather_error(e: WeatherError) -> anyhow::Error {
    match e {
        WeatherError::Io { .. } => anyhow::Error::new(e),
        e => bad_input(e),
    }
}

/// Arguments of `dwell weather summary`.
#[derive(clap::Args)]
pub struct SummaryArgs {
    /// Weather file (CSV); without it, the built-in default weather
    file: Option<PathBuf>,
    /// Base temperature of the heating degree-days (°C)
    #[arg(long, value_name = "°C", default_value_t = summary::DEFAULT_HDD_BASE_C)]
    hdd_base: f64,
    /// Print JSON instead of a table
    #[arg(long)]
    json: bool,
    #[command(flatten)]
    read: ReadArgs,
}

/// Arguments of `dwell weather sun`.
#[derive(clap::Args)]
pub struct SunArgs {
    /// Weather file (CSV); without it, the built-in default weather and its site
    file: Option<PathBuf>,
    /// Take the site (latitude, longitude, elevation, albedo) from this model file
    #[arg(long, value_name = "MODEL", conflicts_with_all = ["lat", "lon"])]
    model: Option<PathBuf>,
    /// Latitude, north positive (degrees); default: the file's `# latitude_deg:` line
    #[arg(long, value_name = "DEG", allow_negative_numbers = true)]
    lat: Option<f64>,
    /// Longitude, east positive (degrees); default: the file's `# longitude_deg:` line
    #[arg(long, value_name = "DEG", allow_negative_numbers = true)]
    lon: Option<f64>,
    /// Elevation (m); default: the file's `# elevation_m:` line, else 0
    #[arg(long, value_name = "M", allow_negative_numbers = true)]
    elevation: Option<f64>,
    /// Ground reflectance, 0 … 1; default: the file's `# albedo:` line, else 0.2
    #[arg(long, value_name = "FRACTION")]
    albedo: Option<f64>,
    /// Tilt of the plane from horizontal (degrees; 0 = horizontal, 90 = vertical)
    #[arg(long, value_name = "DEG")]
    tilt: f64,
    /// Azimuth of the plane's outward normal, clockwise from north (degrees; 180 = south)
    #[arg(long, value_name = "DEG")]
    azimuth: f64,
    /// Sky diffuse model: isotropic, hay-davies or perez
    #[arg(long, value_name = "MODEL", default_value = "hay-davies")]
    sky: SkyModel,
    /// Write the CSV to this file instead of standard output
    #[arg(long, value_name = "FILE")]
    out: Option<PathBuf>,
    #[command(flatten)]
    read: ReadArgs,
}

/// Arguments of `dwell weather synth`. Defaults describe a mild, cloudy mid-latitude climate.
#[derive(clap::Args)]
pub struct SynthArgs {
    /// Name written in the file
    #[arg(long, default_value = "unnamed invented climate")]
    name: String,
    /// Annual mean air temperature (°C)
    #[arg(
        long,
        value_name = "°C",
        default_value_t = 10.0,
        allow_negative_numbers = true
    )]
    mean: f64,
    /// Seasonal swing, peak to peak (K)
    #[arg(long, value_name = "K", default_value_t = 12.0)]
    annual_swing: f64,
    /// Mean daily swing, peak to peak (K)
    #[arg(long, value_name = "K", default_value_t = 7.0)]
    daily_swing: f64,
    /// Standard deviation of the day-to-day weather anomaly (K)
    #[arg(long, value_name = "K", default_value_t = 2.5)]
    anomaly_sd: f64,
    /// Persistence of warm and cold spells, e-folding time (days)
    #[arg(long, value_name = "DAYS", default_value_t = 3.0)]
    persistence: f64,
    /// Mean cloud cover, fraction of the sky (0.01 … 0.99)
    #[arg(long, value_name = "FRACTION", default_value_t = 0.6)]
    cloudiness: f64,
    /// Latitude, north positive (degrees, −66 … 66)
    #[arg(
        long,
        value_name = "DEG",
        default_value_t = 52.0,
        allow_negative_numbers = true
    )]
    lat: f64,
    /// Longitude, east positive (degrees)
    #[arg(
        long,
        value_name = "DEG",
        default_value_t = 0.0,
        allow_negative_numbers = true
    )]
    lon: f64,
    /// Elevation (m)
    #[arg(
        long,
        value_name = "M",
        default_value_t = 50.0,
        allow_negative_numbers = true
    )]
    elevation: f64,
    /// Offset of local standard time from UTC (hours, quarter hours allowed)
    #[arg(
        long,
        value_name = "HOURS",
        default_value_t = 0.0,
        allow_negative_numbers = true
    )]
    utc_offset: f64,
    /// Calendar year
    #[arg(long, default_value_t = 2025)]
    year: i32,
    /// Constant wind speed written in the file (m/s)
    #[arg(long, value_name = "M/S", default_value_t = 4.0)]
    wind: f64,
    /// Seed of the random generator (same seed and parameters: same file, byte for byte)
    #[arg(long, default_value_t = 1)]
    seed: u64,
    /// Write to this file (through a temporary file and a rename) instead of standard output
    #[arg(long, value_name = "FILE")]
    out: Option<PathBuf>,
}

/// Runs the command.
pub fn run(cmd: WeatherCommand) -> anyhow::Result<()> {
    match cmd {
        WeatherCommand::Summary(a) => run_summary(*a),
        WeatherCommand::Sun(a) => run_sun(*a),
        WeatherCommand::Synth(a) => run_synth(*a),
    }
}

fn run_summary(a: SummaryArgs) -> anyhow::Result<()> {
    let w = a.read.read(a.file.as_deref())?;
    if !a.hdd_base.is_finite() || !(-20.0..=30.0).contains(&a.hdd_base) {
        return Err(bad_input(format!(
            "--hdd-base {} is outside -20 … 30 °C",
            a.hdd_base
        )));
    }
    let s = summary::summarize(&w, a.hdd_base);
    let text = if a.json {
        serde_json::to_string_pretty(&s)? + "\n"
    } else {
        s.to_text()
    };
    print_out(&text)
}

fn run_sun(a: SunArgs) -> anyhow::Result<()> {
    let w = a.read.read(a.file.as_deref())?;
    let from_file = match a.file {
        None => Some(Ok(default_site())),
        Some(_) => Site::from_metadata(&w),
    };
    let mut from_file = from_file.transpose().map_err(bad_input)?;
    if let Some(path) = &a.model {
        let m = super::model_io::load(path)?;
        from_file = Some(Site {
            latitude_deg: m.site.latitude_deg,
            longitude_deg: m.site.longitude_deg,
            elevation_m: m.site.elevation_m,
            albedo: m.site.ground_albedo,
        });
    }
    let lat = a.lat.or(from_file.map(|s| s.latitude_deg));
    let lon = a.lon.or(from_file.map(|s| s.longitude_deg));
    let (Some(lat), Some(lon)) = (lat, lon) else {
        return Err(bad_input(format!(
            "{}: no site; give --lat and --lon (degrees, north and east positive), or add \
             `# latitude_deg: …` and `# longitude_deg: …` lines at the top of the file",
            w.source
        )));
    };
    let elevation = a
        .elevation
        .or(from_file.map(|s| s.elevation_m))
        .unwrap_or(0.0);
    let albedo = a
        .albedo
        .or(from_file.map(|s| s.albedo))
        .unwrap_or(DEFAULT_ALBEDO);
    let site = Site::new(lat, lon, elevation, albedo).map_err(bad_input)?;
    if !a.tilt.is_finite() || !(0.0..=180.0).contains(&a.tilt) {
        return Err(bad_input(format!(
            "--tilt {} is outside 0 … 180 degrees (0 horizontal facing up, 90 vertical)",
            a.tilt
        )));
    }
    if !a.azimuth.is_finite() || !(0.0..=360.0).contains(&a.azimuth) {
        return Err(bad_input(format!(
            "--azimuth {} is outside 0 … 360 degrees (clockwise from north, 180 = south)",
            a.azimuth
        )));
    }
    let sun = SunTable::new(&w, &site);
    let plane = sun.plane_components(a.tilt, a.azimuth, a.sky);
    let mut s = String::with_capacity(sun.len() * 80);
    s.push_str(&format!(
        "# sun for {} at latitude {} longitude {} elevation {} m; plane tilt {} azimuth {} \
         (clockwise from north); sky {}; albedo {}\n",
        w.source,
        site.latitude_deg,
        site.longitude_deg,
        site.elevation_m,
        a.tilt,
        a.azimuth,
        match a.sky {
            SkyModel::Isotropic => "isotropic",
            SkyModel::HayDavies => "hay-davies",
            SkyModel::Perez => "perez",
        },
        site.albedo
    ));
    s.push_str("# zenith and azimuth at the middle of the hour ending at the stamp; irradiance = hour means\n");
    s.push_str("time,zenith_deg,azimuth_deg,plane_w_m2,beam_w_m2,sky_diffuse_w_m2,ground_reflected_w_m2,incidence_deg\n");
    for (i, p) in plane.iter().enumerate() {
        s.push_str(&format!(
            "{},{:.3},{:.3},{:.1},{:.1},{:.1},{:.1},{:.2}\n",
            format_stamp(&sun.times[i]),
            sun.zenith_deg[i],
            sun.azimuth_deg[i],
            p.total_w_m2() + 0.0,
            p.beam_w_m2 + 0.0,
            p.sky_diffuse_w_m2 + 0.0,
            p.ground_reflected_w_m2 + 0.0,
            p.incidence_deg
        ));
    }
    match a.out {
        Some(path) => write_atomic(&path, s.as_bytes()).map_err(weather_error),
        None => print_out(&s),
    }
}

fn run_synth(a: SynthArgs) -> anyhow::Result<()> {
    let p = ClimateParams {
        name: a.name,
        annual_mean_c: a.mean,
        annual_swing_k: a.annual_swing,
        daily_swing_k: a.daily_swing,
        anomaly_sd_k: a.anomaly_sd,
        persistence_days: a.persistence,
        cloudiness: a.cloudiness,
        latitude_deg: a.lat,
        longitude_deg: a.lon,
        elevation_m: a.elevation,
        utc_offset_h: a.utc_offset,
        year: a.year,
        wind_m_s: a.wind,
        seed: a.seed,
    };
    let w = synth::synthesize(&p).map_err(weather_error)?;
    let text = synth::file_text(&w);
    match a.out {
        Some(path) => {
            write_atomic(&path, text.as_bytes()).map_err(weather_error)?;
            eprintln!("wrote {} ({} hours)", path.display(), w.len());
            Ok(())
        }
        None => print_out(&text),
    }
}

fn print_out(s: &str) -> anyhow::Result<()> {
    let mut out = std::io::stdout().lock();
    match out.write_all(s.as_bytes()).and_then(|_| out.flush()) {
        Err(e) if e.kind() == std::io::ErrorKind::BrokenPipe => Ok(()),
        r => r.context("cannot write to standard output"),
    }
}

//! Simulation of a period: the exact stepper under a control, hourly results, the energy
//! ledger and comfort.

use chrono::{DateTime, FixedOffset, NaiveDate};
use dwell_model::{House, ModelFile};
use dwell_solver::{ControlChannel, Discretization, OnOffThermostat, Readout, Route, Stepper};
use dwell_weather::{SkyModel, WeatherSeries};
use nalgebra::DMatrix;
use serde::Serialize;

use crate::comfort::Comfort;
use crate::forcing::Forcing;

/// How the heaters are driven.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize)]
#[serde(rename_all = "snake_case")]
pub enum Control {
    /// No heating: the house floats.
    Free,
    /// Capacity-limited thermostats: each step, the powers in [0, capacity] that bring every
    /// heated zone to its setpoint at the end of the step, solved jointly.
    Thermostat,
    /// On/off thermostats with each heater's dead band, full power when on.
    OnOff,
    /// Each heater follows its `power_schedule` (W), clipped to [0, capacity].
    Schedule,
}

/// Options of a simulation.
#[derive(Clone, Debug)]
pub struct SimOptions {
    /// Time step (s): 60 … 3600 and a divisor of one hour.
    pub step_s: f64,
    /// Control of the heaters.
    pub control: Control,
    /// Start every node at this temperature (°C) instead of warming up.
    pub initial_c: Option<f64>,
    /// First local day to simulate (default: the weather's first stamp).
    pub from: Option<NaiveDate>,
    /// Last local day to simulate, inclusive (default: the weather's last stamp).
    pub to: Option<NaiveDate>,
    /// Discretisation route (modal by default; block as a cross-check).
    pub route: Route,
    /// Sky model for diffuse irradiance on tilted planes.
    pub sky: SkyModel,
    /// Length of the warm-up window repeated until the state settles (days).
    pub warmup_days: usize,
}

impl Default for SimOptions {
    fn default() -> Self {
        SimOptions {
            step_s: 3600.0,
            control: Control::Thermostat,
            initial_c: None,
            from: None,
            to: None,
            route: Route::Modal,
            sky: SkyModel::HayDavies,
            warmup_days: 7,
        }
    }
}

/// A simulation that cannot run.
#[derive(Debug, thiserror::Error)]
#[non_exhaustive]
pub enum StudyError {
    /// An option is out of range or inconsistent with the weather.
    #[error("{0}")]
    Option(String),
    /// The solver refused the system.
    #[error("solver: {0}")]
    Solver(#[from] dwell_solver::SolverError),
}

/// Heat and purchased energy of one heater.
#[derive(Clone, Debug, Serialize)]
pub struct HeaterResult {
    /// Heater id.
    pub heater: String,
    /// Zone id.
    pub zone: String,
    /// Capacity (W).
    pub capacity_w: f64,
    /// Heat delivered (kWh).
    pub heat_kwh: f64,
    /// Energy purchased: heat / efficiency or / COP (kWh).
    pub purchased_kwh: f64,
    /// Money for the purchased energy, if a price is given.
    pub cost: Option<f64>,
    /// Highest hourly mean output (W).
    pub peak_hourly_w: f64,
    /// Switch-ons per hour (on/off control only).
    pub cycles_per_hour: Option<f64>,
}

/// Results of one zone.
#[derive(Clone, Debug, Serialize)]
pub struct ZoneResult {
    /// Zone id.
    pub zone: String,
    /// Heat delivered by the zone's heaters (kWh).
    pub heating_kwh: f64,
    /// Highest hourly mean heating power (W).
    pub peak_heating_w: f64,
    /// Lowest hourly air temperature (°C).
    pub min_c: f64,
    /// Highest hourly air temperature (°C).
    pub max_c: f64,
    /// Mean hourly air temperature (°C).
    pub mean_c: f64,
    /// Comfort over occupied hours, if the zone has a comfort band.
    pub comfort: Option<Comfort>,
}

/// Where the heat went over the period (kWh). Exact: the solver integrates every flow.
#[derive(Clone, Debug, Serialize)]
pub struct EnergyBalance {
    /// Heat from heaters (kWh).
    pub heating_kwh: f64,
    /// Internal gains (kWh).
    pub internal_gains_kwh: f64,
    /// Sun transmitted by glazing (kWh).
    pub solar_kwh: f64,
    /// Sun absorbed on opaque outer surfaces (kWh). Most of it leaves again through the outside
    /// film, so it is not counted as a gain: each group's loss below is net of it.
    pub sun_on_opaque_kwh: f64,
    /// Raw-network heat inputs (kWh).
    pub other_heat_kwh: f64,
    /// Heat leaving through each element group, net of the sun absorbed on its outer surfaces
    /// (kWh, negative = gained).
    pub losses_kwh: std::collections::BTreeMap<String, f64>,
    /// Increase of heat stored in the building (kWh).
    pub stored_change_kwh: f64,
    /// In − out − stored (kWh): rounding only.
    pub residual_kwh: f64,
    /// Residual relative to the largest term (1).
    pub residual_relative: f64,
}

/// Everything a simulation produced.
#[derive(Clone, Debug, Serialize)]
pub struct Summary {
    /// House name.
    pub model: String,
    /// Weather source.
    pub weather: String,
    /// First stamp.
    pub from: String,
    /// Last stamp.
    pub to: String,
    /// Hours simulated.
    pub hours: usize,
    /// Step (s).
    pub step_s: f64,
    /// Control.
    pub control: Control,
    /// How the run started.
    pub start: String,
    /// Per zone.
    pub zones: Vec<ZoneResult>,
    /// Per heater.
    pub heaters: Vec<HeaterResult>,
    /// Whole house: heat (kWh).
    pub total_heating_kwh: f64,
    /// Whole house: highest hourly mean heating power (W).
    pub total_peak_heating_w: f64,
    /// Whole house: purchased energy (kWh).
    pub total_purchased_kwh: f64,
    /// Whole house: money, if every heater has a price.
    pub total_cost: Option<f64>,
    /// The ledger.
    pub energy_balance: EnergyBalance,
    /// Plain-words warnings.
    pub warnings: Vec<String>,
    /// Cautions.
    pub cautions: Vec<String>,
}

/// Hourly results and the summary.
#[derive(Clone, Debug)]
pub struct SimResult {
    /// Hourly stamps, the first being the start instant.
    pub times: Vec<DateTime<FixedOffset>>,
    /// Outdoor air at each stamp (°C).
    pub outdoor_c: Vec<f64>,
    /// Zone ids.
    pub zones: Vec<String>,
    /// Air temperature per zone at each stamp (°C), `[zone][hour]`.
    pub zone_c: Vec<Vec<f64>>,
    /// Mean heating power per zone over the hour ending at each stamp (W); NaN at the start.
    pub zone_heating_w: Vec<Vec<f64>>,
    /// Input names (as `dwell network --json`).
    pub input_names: Vec<String>,
    /// Inputs as applied, row-major `[hour · inputs + input]`: temperatures at the stamp, heat
    /// flows as means over the hour starting at the stamp (NaN for the last stamp).
    pub inputs: Vec<f64>,
    /// The summary.
    pub summary: Summary,
}

/// Allowed steps (s): divisors of one hour from 1 minute.
pub const ALLOWED_STEPS_MIN: [u32; 12] = [1, 2, 3, 4, 5, 6, 10, 12, 15, 20, 30, 60];

/// Efficiency or COP of heater `h` at outdoor air `t` (°C): linear between the points of its
/// COP curve, flat beyond the ends.
pub(crate) fn cop_at(h: &dwell_model::file::Heater, t: f64) -> f64 {
    let c = &h.cop_curve;
    if c.is_empty() {
        return h.efficiency;
    }
    if t <= c[0].outdoor_c {
        return c[0].cop;
    }
    for w in c.windows(2) {
        if t <= w[1].outdoor_c {
            let f = (t - w[0].outdoor_c) / (w[1].outdoor_c - w[0].outdoor_c);
            return w[0].cop + f * (w[1].cop - w[0].cop);
        }
    }
    c[c.len() - 1].cop
}

/// The capacity-limited thermostat's channels of a house: one per zone whose heaters have a
/// setpoint, driving those heaters together at the same fraction of their capacities.
pub struct ThermostatChannels {
    /// Channels for [`Stepper::with_control`]; `output` is the zone index.
    pub channels: Vec<ControlChannel>,
    /// Heater indices (model order) of each channel.
    pub heaters: Vec<Vec<usize>>,
    /// Zone index of each channel.
    pub zones: Vec<usize>,
}

/// Builds the thermostat channels of `house`; `controlled(heater index)` says whether a heater
/// follows a setpoint. Heaters with no capacity are left out.
pub fn thermostat_channels(
    model: &ModelFile,
    house: &House,
    controlled: &dyn Fn(usize) -> bool,
) -> ThermostatChannels {
    let mut out = ThermostatChannels {
        channels: Vec::new(),
        heaters: Vec::new(),
        zones: Vec::new(),
    };
    for (zi, z) in house.zones.iter().enumerate() {
        let hs: Vec<usize> = model
            .heaters
            .iter()
            .enumerate()
            .filter(|(hi, h)| h.zone == z.id && h.capacity_w > 0.0 && controlled(*hi))
            .map(|(hi, _)| hi)
            .collect();
        if hs.is_empty() {
            continue;
        }
        out.channels.push(ControlChannel {
            weights: hs
                .iter()
                .map(|&hi| (house.heater_inputs[hi], model.heaters[hi].capacity_w))
                .collect(),
            output: zi,
        });
        out.heaters.push(hs);
        out.zones.push(zi);
    }
    out
}

/// Warnings when the weather was made for another place or time zone than the model's site.
pub fn site_warnings(model: &ModelFile, weather: &WeatherSeries) -> Vec<String> {
    let mut out = Vec::new();
    let lat = weather
        .metadata_value("latitude_deg")
        .and_then(|v| v.trim().parse::<f64>().ok());
    let lon = weather
        .metadata_value("longitude_deg")
        .and_then(|v| v.trim().parse::<f64>().ok());
    if let (Some(lat), Some(lon)) = (lat, lon) {
        let s = &model.site;
        if (lat - s.latitude_deg).abs() > 1.0 || (lon - s.longitude_deg).abs() > 1.0 {
            out.push(format!(
                "the weather file is for latitude {lat:.2}, longitude {lon:.2} but the model's site is {:.2}, {:.2}; the sun is computed for the model's site — use weather for the house's own location",
                s.latitude_deg, s.longitude_deg
            ));
        }
    }
    let weather_offset_h = weather.offset().local_minus_utc() as f64 / 3600.0;
    if (weather_offset_h - model.site.utc_offset_h).abs() > 1e-9 {
        out.push(format!(
            "the weather's stamps are at UTC{weather_offset_h:+} h but the model's site uses UTC{:+} h; schedules follow the model's site",
            model.site.utc_offset_h
        ));
    }
    out
}

/// Runs a simulation of `house` (compiled from `model`) over `weather`.
pub fn simulate(
    model: &ModelFile,
    house: &House,
    weather: &WeatherSeries,
    opts: &SimOptions,
) -> Result<SimResult, StudyError> {
    let step_min = opts.step_s / 60.0;
    if !ALLOWED_STEPS_MIN
        .iter()
        .any(|&m| (m as f64 - step_min).abs() < 1e-9)
    {
        return Err(StudyError::Option(format!(
            "a step of {step_min} minutes is not allowed; use one of {ALLOWED_STEPS_MIN:?} (it must divide one hour)"
        )));
    }
    if weather.len() < 2 {
        return Err(StudyError::Option(
            "the weather has fewer than two hours".into(),
        ));
    }
    let forcing = Forcing::new(model, house, weather, opts.step_s, opts.sky);
    let (start, end) = crate::trace::period_stamps(&forcing, opts.from, opts.to)?;
    let net = &house.network;
    let n = net.states.len();
    let m = net.inputs.len();
    let nz = house.zones.len();
    let disc = Discretization::new(&net.system, opts.step_s, opts.route)?;

    // Readouts: zone air at step ends; boundary flows by group as exact step means.
    let zone_rows = Readout::nodes(
        &house.zones.iter().map(|z| z.air_state).collect::<Vec<_>>(),
        n,
        m,
    );
    let groups: Vec<&String> = net.boundary_flow.keys().collect();
    let gx = DMatrix::from_fn(groups.len(), n, |g, i| net.boundary_flow[groups[g]].x[i]);
    let gu = DMatrix::from_fn(groups.len(), m, |g, j| net.boundary_flow[groups[g]].u[j]);
    let flows = Readout::new(gx, gu)?;
    let mut stepper = Stepper::new(&disc, &zone_rows, &flows)?;

    // Thermostat channels: one per zone with setpoint heaters.
    let ThermostatChannels {
        channels,
        heaters: channel_heaters,
        ..
    } = thermostat_channels(model, house, &|hi| forcing.setpoints[hi].is_some());
    let q = channels.len();
    let use_channels = matches!(opts.control, Control::Thermostat | Control::OnOff) && q > 0;
    if use_channels {
        stepper = stepper.with_control(&channels)?;
    }
    let dead_band = model
        .heaters
        .iter()
        .map(|h| h.dead_band_k)
        .fold(0.0, f64::max)
        .max(0.1);
    let mut onoff = OnOffThermostat::new(q.max(1), dead_band)?;

    // Buffers (the loop below allocates nothing beyond the preallocated results).
    let mut u_k = vec![0.0; m];
    let mut u_next = vec![0.0; m];
    let mut setpoint = vec![0.0; q];
    let enabled = vec![true; q];
    let mut fraction = vec![0.0; q];
    let mut x = vec![0.0; n];

    // One step k (from stamp `s0`): fills inputs, applies control, steps. Returns nothing; the
    // applied inputs are left in `u_k` (heater entries included).
    macro_rules! advance {
        ($s0:expr, $k:expr) => {{
            let k = $k;
            forcing.fill($s0, k, &mut u_k);
            forcing.fill($s0, k + 1, &mut u_next);
            match opts.control {
                Control::Free => stepper.step(&u_k, &u_next),
                Control::Schedule => {
                    for (hi, h) in model.heaters.iter().enumerate() {
                        if let Some(s) = &forcing.power[hi] {
                            u_k[house.heater_inputs[hi]] =
                                forcing.step_mean(s, $s0, k).clamp(0.0, h.capacity_w);
                        }
                    }
                    stepper.step(&u_k, &u_next)
                }
                Control::Thermostat | Control::OnOff if use_channels => {
                    for c in 0..q {
                        setpoint[c] = channel_heaters[c]
                            .iter()
                            .map(|&hi| {
                                forcing.at_step_end(
                                    forcing.setpoints[hi].as_ref().expect("setpoint heater"),
                                    $s0,
                                    k,
                                )
                            })
                            .fold(f64::NEG_INFINITY, f64::max);
                    }
                    if opts.control == Control::Thermostat {
                        stepper.step_thermostat(
                            &mut u_k,
                            &u_next,
                            &setpoint,
                            &enabled,
                            &mut fraction,
                        );
                    } else {
                        stepper.step_on_off(
                            &mut onoff,
                            &mut u_k,
                            &u_next,
                            &setpoint,
                            &enabled,
                            &mut fraction,
                        );
                    }
                }
                _ => stepper.step(&u_k, &u_next),
            }
        }};
    }

    // Start: a fixed temperature, or the first days repeated until the state settles.
    let sph = forcing.steps_per_hour;
    let start_note;
    match opts.initial_c {
        Some(t) => {
            stepper.set_state(&vec![t; n]);
            start_note = format!("every node at {t} °C");
        }
        None => {
            let first = house
                .zones
                .first()
                .map(|z| z.design_indoor_c)
                .unwrap_or(20.0);
            stepper.set_state(&vec![first; n]);
            let window = (opts.warmup_days * 24).min(end - start) * sph;
            let mut prev = vec![first; n];
            let mut cycles = 0;
            let mut change = f64::INFINITY;
            while cycles < 30 && change > 0.01 {
                for k in 0..window {
                    advance!(start, k);
                }
                stepper.state_into(&mut x);
                change = x
                    .iter()
                    .zip(&prev)
                    .map(|(a, b)| (a - b).abs())
                    .fold(0.0, f64::max);
                prev.copy_from_slice(&x);
                cycles += 1;
            }
            start_note = format!(
                "warm-up: the first {} h repeated {} times (last change {:.3} K)",
                window / sph,
                cycles,
                change
            );
        }
    }
    onoff.reset_counts();

    // Results.
    let hours = end - start;
    let mut times = Vec::with_capacity(hours + 1);
    let mut outdoor = Vec::with_capacity(hours + 1);
    let mut zone_c: Vec<Vec<f64>> = (0..nz).map(|_| Vec::with_capacity(hours + 1)).collect();
    let mut zone_heat: Vec<Vec<f64>> = (0..nz).map(|_| Vec::with_capacity(hours + 1)).collect();
    let mut inputs_rows: Vec<f64> = Vec::with_capacity((hours + 1) * m);
    let temperature_inputs: Vec<usize> = house
        .inputs
        .iter()
        .enumerate()
        .filter(|(_, r)| {
            matches!(
                r,
                dwell_model::InputRole::OutdoorAir
                    | dwell_model::InputRole::Ground
                    | dwell_model::InputRole::Boundary { .. }
            )
        })
        .map(|(j, _)| j)
        .collect();
    let mut u_stamp = vec![0.0; m];
    stepper.state_into(&mut x);
    let stored0: f64 = x
        .iter()
        .zip(&net.system.capacitance)
        .map(|(t, c)| t * c)
        .sum();
    times.push(forcing.times[start]);
    outdoor.push(forcing.air_c[start]);
    for (zi, z) in house.zones.iter().enumerate() {
        zone_c[zi].push(x[z.air_state]);
        zone_heat[zi].push(f64::NAN);
    }
    let nh = model.heaters.len();
    let mut heater_j = vec![0.0; nh];
    let mut purchased_j = vec![0.0; nh];
    let mut heater_peak = vec![0.0f64; nh];
    let mut heater_hour = vec![0.0; nh];
    let mut group_j = vec![0.0; groups.len()];
    let mut heat_in_j = [0.0f64; 4]; // heating, gains, solar through glazing, other
                                     // Sun on opaque surfaces, netted against the group it lands on.
    let solar_to_group: Vec<(usize, usize, f64)> = house
        .solar_targets
        .iter()
        .filter(|(_, g, _)| *g != "windows")
        .filter_map(|(j, g, a)| groups.iter().position(|x| x == g).map(|gi| (*j, gi, *a)))
        .collect();
    let glazing: Vec<f64> = (0..m)
        .map(|j| {
            house
                .solar_targets
                .iter()
                .filter(|(jj, g, _)| *jj == j && *g == "windows")
                .map(|(_, _, a)| a)
                .sum()
        })
        .collect();
    let mut opaque_sun_j = 0.0;
    let mut hour_inputs = vec![0.0; m];
    let h = opts.step_s;
    for hour in 0..hours {
        hour_inputs.iter_mut().for_each(|v| *v = 0.0);
        heater_hour.iter_mut().for_each(|v| *v = 0.0);
        for s in 0..sph {
            let k = hour * sph + s;
            advance!(start, k);
            let t_out = 0.5 * (u_k[0] + u_next[0]);
            for (j, role) in house.inputs.iter().enumerate() {
                hour_inputs[j] += u_k[j] / sph as f64;
                let q_j = net.injected[j] * u_k[j] * h;
                match role {
                    dwell_model::InputRole::Heater { heater } => {
                        heater_j[*heater] += q_j;
                        heater_hour[*heater] += u_k[j] / sph as f64;
                        purchased_j[*heater] += q_j / cop_at(&model.heaters[*heater], t_out);
                        heat_in_j[0] += q_j;
                    }
                    dwell_model::InputRole::Gains { .. } => heat_in_j[1] += q_j,
                    dwell_model::InputRole::SolarPlane { .. } => {
                        heat_in_j[2] += glazing[j] * u_k[j] * h
                    }
                    dwell_model::InputRole::RawHeat { .. } => heat_in_j[3] += q_j,
                    _ => {}
                }
            }
            for (g, v) in stepper.mean().iter().enumerate() {
                group_j[g] += v * h;
            }
            for &(j, g, a) in &solar_to_group {
                group_j[g] -= a * u_k[j] * h;
                opaque_sun_j += a * u_k[j] * h;
            }
        }
        // temperatures at the stamp that opens this hour; heat flows over it
        forcing.fill(start, hour * sph, &mut u_stamp);
        for &j in &temperature_inputs {
            hour_inputs[j] = u_stamp[j];
        }
        inputs_rows.extend_from_slice(&hour_inputs);
        times.push(forcing.times[start + hour + 1]);
        outdoor.push(forcing.air_c[start + hour + 1]);
        let temps = stepper.instant();
        for zi in 0..nz {
            zone_c[zi].push(temps[zi]);
        }
        for (hi, hv) in heater_hour.iter().enumerate() {
            heater_peak[hi] = heater_peak[hi].max(*hv);
        }
        for (zi, z) in house.zones.iter().enumerate() {
            let w: f64 = model
                .heaters
                .iter()
                .enumerate()
                .filter(|(_, hh)| hh.zone == z.id)
                .map(|(hi, _)| heater_hour[hi])
                .sum();
            zone_heat[zi].push(w);
        }
    }
    // last stamp: temperatures only
    forcing.fill(start, hours * sph, &mut u_stamp);
    hour_inputs.iter_mut().for_each(|v| *v = f64::NAN);
    for &j in &temperature_inputs {
        hour_inputs[j] = u_stamp[j];
    }
    inputs_rows.extend_from_slice(&hour_inputs);

    stepper.state_into(&mut x);
    let stored1: f64 = x
        .iter()
        .zip(&net.system.capacitance)
        .map(|(t, c)| t * c)
        .sum();
    let kwh = |j: f64| j / 3.6e6;
    let losses: std::collections::BTreeMap<String, f64> = groups
        .iter()
        .zip(&group_j)
        .map(|(g, j)| ((*g).clone(), kwh(*j)))
        .collect();
    let heat_in: f64 = heat_in_j.iter().sum();
    let out: f64 = group_j.iter().sum();
    let stored = stored1 - stored0;
    let residual = heat_in - out - stored;
    let scale = heat_in.abs().max(out.abs()).max(stored.abs()).max(1.0);

    // Zones and comfort.
    let mut warnings = site_warnings(model, weather);
    let mut zones = Vec::new();
    for (zi, z) in house.zones.iter().enumerate() {
        let temps = &zone_c[zi];
        let occupied: Vec<bool> = times
            .iter()
            .map(|t| match &forcing.occupancy[zi] {
                Some(s) => s.value_at(forcing.local(*t)) > 0.0,
                None => true,
            })
            .collect();
        let comfort = z
            .comfort
            .map(|band| Comfort::evaluate(band, &times[1..], &temps[1..], &occupied[1..]));
        if let Some(c) = &comfort {
            warnings.extend(c.warnings(&z.id));
        }
        let heat: f64 = model
            .heaters
            .iter()
            .enumerate()
            .filter(|(_, hh)| hh.zone == z.id)
            .map(|(hi, _)| heater_j[hi])
            .sum();
        zones.push(ZoneResult {
            zone: z.id.clone(),
            heating_kwh: kwh(heat) + 0.0,
            peak_heating_w: zone_heat[zi][1..].iter().copied().fold(0.0, f64::max),
            min_c: temps.iter().copied().fold(f64::INFINITY, f64::min),
            max_c: temps.iter().copied().fold(f64::NEG_INFINITY, f64::max),
            mean_c: temps.iter().sum::<f64>() / temps.len() as f64,
            comfort,
        });
    }
    let heaters: Vec<HeaterResult> = model
        .heaters
        .iter()
        .enumerate()
        .map(|(hi, hh)| {
            let cycles = if opts.control == Control::OnOff {
                channel_heaters
                    .iter()
                    .position(|c| c.contains(&hi))
                    .map(|c| onoff.switch_ons()[c] as f64 / hours as f64)
            } else {
                None
            };
            HeaterResult {
                heater: hh.id.clone(),
                zone: hh.zone.clone(),
                capacity_w: hh.capacity_w,
                heat_kwh: kwh(heater_j[hi]),
                purchased_kwh: kwh(purchased_j[hi]),
                cost: hh.price_per_kwh.map(|p| p * kwh(purchased_j[hi])),
                peak_hourly_w: heater_peak[hi],
                cycles_per_hour: cycles,
            }
        })
        .collect();
    let total_peak = (1..=hours)
        .map(|i| zone_heat.iter().map(|z| z[i]).sum::<f64>())
        .fold(0.0, f64::max);
    for hr in &heaters {
        if let Some(c) = hr.cycles_per_hour {
            if c > 3.0 {
                warnings.push(format!(
                    "{} switches on {:.1} times an hour on average: it may be oversized for {}",
                    hr.heater, c, hr.zone
                ));
            }
        }
    }
    let summary = Summary {
        model: house.name.clone(),
        weather: weather.source.clone(),
        from: times[0].to_rfc3339(),
        to: times[hours].to_rfc3339(),
        hours,
        step_s: opts.step_s,
        control: opts.control,
        start: start_note,
        total_heating_kwh: zones.iter().map(|z| z.heating_kwh).sum(),
        total_peak_heating_w: total_peak,
        total_purchased_kwh: heaters.iter().map(|h| h.purchased_kwh).sum(),
        total_cost: heaters.iter().map(|h| h.cost).sum::<Option<f64>>(),
        zones,
        heaters,
        energy_balance: EnergyBalance {
            heating_kwh: kwh(heat_in_j[0]),
            internal_gains_kwh: kwh(heat_in_j[1]),
            solar_kwh: kwh(heat_in_j[2]),
            sun_on_opaque_kwh: kwh(opaque_sun_j),
            other_heat_kwh: kwh(heat_in_j[3]),
            losses_kwh: losses,
            stored_change_kwh: kwh(stored),
            residual_kwh: kwh(residual),
            residual_relative: residual / scale,
        },
        warnings,
        cautions: vec![crate::CAUTION.to_string()],
    };
    Ok(SimResult {
        times,
        outdoor_c: outdoor,
        zones: house.zones.iter().map(|z| z.id.clone()).collect(),
        zone_c,
        zone_heating_w: zone_heat,
        input_names: net.inputs.iter().map(|i| i.name.clone()).collect(),
        inputs: inputs_rows,
        summary,
    })
}

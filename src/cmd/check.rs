//! `dwell check MODEL`: validate a model and print its heat-loss summary.

use std::path::PathBuf;

use dwell_model::summary::{check_summary, CheckSummary, ZoneLoss};

use super::model_io;

/// Arguments of `dwell check`.
#[derive(clap::Args)]
pub struct CheckArgs {
    /// Model file (JSON)
    pub model: PathBuf,
    /// Print the summary as JSON instead of a table
    #[arg(long)]
    pub json: bool,
}

/// Runs the command.
pub fn run(args: CheckArgs) -> anyhow::Result<()> {
    let (_, house) = model_io::load_house(&args.model)?;
    let s = check_summary(&house);
    if args.json {
        println!("{}", serde_json::to_string_pretty(&s)?);
    } else {
        print!("{}", table(&s));
    }
    Ok(())
}

fn row(z: &ZoneLoss, label: &str) -> String {
    format!(
        "{:<22}{:>8.1}{:>8.1}{:>9.1}{:>9.1}{:>7.1}{:>8.1}{:>8.1}{:>9.1}{:>10.1}\n",
        label,
        z.walls_w_k,
        z.roof_w_k,
        z.floor_ground_w_k,
        z.windows_w_k,
        z.doors_w_k,
        z.ventilation_w_k,
        z.links_w_k,
        z.total_w_k,
        z.to_other_zones_w_k
    )
}

/// The plain-text check sheet.
pub fn table(s: &CheckSummary) -> String {
    let mut out = String::new();
    out.push_str(&format!(
        "{}: model is valid\n",
        if s.name.is_empty() { "model" } else { &s.name }
    ));
    out.push_str(&format!(
        "network: {} states, {} inputs, {} massless nodes eliminated; heat capacity {:.1} MJ/K\n",
        s.states, s.inputs, s.eliminated_nodes, s.heat_capacity_mj_k
    ));
    out.push_str(&format!(
        "time constants: longest {:.1} h, shortest {:.3} h\n\n",
        s.longest_time_constant_h, s.shortest_time_constant_h
    ));
    out.push_str("heat-loss coefficient by zone (W/K)\n");
    out.push_str(&format!(
        "{:<22}{:>8}{:>8}{:>9}{:>9}{:>7}{:>8}{:>8}{:>9}{:>10}\n",
        "zone",
        "walls",
        "roof",
        "floor/gr",
        "windows",
        "doors",
        "vent",
        "links",
        "total",
        "to zones"
    ));
    for z in &s.zones {
        let label = format!(
            "{} ({}{:.0} m²)",
            z.zone,
            if z.heated { "" } else { "unheated, " },
            z.floor_area_m2
        );
        out.push_str(&row(z, &label));
    }
    out.push_str(&row(&s.total, "whole house"));
    if s.total.floor_area_m2 > 0.0 {
        out.push_str(&format!(
            "per floor area: {:.2} W/(m²·K); at a 24 K difference about {:.0} W/m²\n",
            s.total.total_w_k / s.total.floor_area_m2,
            24.0 * s.total.total_w_k / s.total.floor_area_m2
        ));
    }
    if !s.constructions.is_empty() {
        out.push_str(
            "\nconstructions (ISO 6946 surface resistances for the heat-flow direction)\n",
        );
        out.push_str(&format!(
            "{:<26}{:>12}{:>12}{:>16}\n",
            "construction", "direction", "U W/(m²K)", "kJ/(m²K)"
        ));
        for c in &s.constructions {
            out.push_str(&format!(
                "{:<26}{:>12}{:>12.3}{:>16.1}\n",
                c.construction, c.direction, c.u_value_w_m2k, c.areal_capacity_kj_m2k
            ));
        }
    }
    out
}

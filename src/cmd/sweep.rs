//! `dwell sweep ROWS.csv --model MODEL --out DIR [--shard i/N]` and
//! `dwell sweep merge DIR… --out DIR`: many variants on all cores, streamed to CSV.

use std::io::Write;
use std::path::{Path, PathBuf};

use dwell_studies::sweep::{fnv1a, merge, parse_rows, run_sweep, shard, Manifest, RESULT_HEADER};
use dwell_studies::SimOptions;

use super::simulate::load_weather;
use crate::exit::bad_input;

/// Arguments of `dwell sweep`.
#[derive(clap::Args)]
#[command(args_conflicts_with_subcommands = true, subcommand_negates_reqs = true)]
pub struct SweepArgs {
    /// Join shard outputs
    #[command(subcommand)]
    pub command: Option<SweepCommand>,
    /// Rows file (CSV): variant, then `patch` and/or JSON-pointer columns (docs/sweep.md)
    pub rows: Option<PathBuf>,
    /// Base model file (JSON)
    #[arg(long)]
    pub model: Option<PathBuf>,
    #[command(flatten)]
    pub period: super::period::PeriodArgs,
    /// Run only shard i of N (1-based): rows i, i+N, i+2N, …
    #[arg(long, value_name = "i/N")]
    pub shard: Option<String>,
    /// Output folder (created if missing)
    #[arg(long)]
    pub out: Option<PathBuf>,
    /// Print nothing but errors
    #[arg(long, short)]
    pub quiet: bool,
}

/// Subcommands of `dwell sweep`.
#[derive(clap::Subcommand)]
pub enum SweepCommand {
    /// Join the output folders of all shards of one sweep into one results.csv
    Merge {
        /// Output folders of the shards
        #[arg(required = true)]
        dirs: Vec<PathBuf>,
        /// Output folder for the merged results
        #[arg(long)]
        out: PathBuf,
    },
}

fn parse_shard(s: &str) -> anyhow::Result<(usize, usize)> {
    let bad = || {
        bad_input(format!(
            "--shard {s}: write i/N with 1 ≤ i ≤ N, e.g. --shard 3/8"
        ))
    };
    let (i, n) = s.split_once('/').ok_or_else(bad)?;
    let (i, n): (usize, usize) = (
        i.trim().parse().map_err(|_| bad())?,
        n.trim().parse().map_err(|_| bad())?,
    );
    if i == 0 || n == 0 || i > n {
        return Err(bad());
    }
    Ok((i, n))
}

fn read(path: &Path, what: &str) -> anyhow::Result<Vec<u8>> {
    std::fs::read(path).map_err(|e| {
        bad_input(format!(
            "cannot read {what} {}: {e}; check the path",
            path.display()
        ))
    })
}

/// Runs the command.
pub fn run(args: SweepArgs) -> anyhow::Result<()> {
    if let Some(SweepCommand::Merge { dirs, out }) = args.command {
        return run_merge(&dirs, &out, args.quiet);
    }
    let rows_path = args.rows.ok_or_else(|| {
        bad_input("give a rows file: dwell sweep ROWS.csv --model MODEL.json --out DIR")
    })?;
    let model_path = args
        .model
        .ok_or_else(|| bad_input("give the base model with --model MODEL.json"))?;
    let out = args
        .out
        .ok_or_else(|| bad_input("give an output folder with --out DIR"))?;
    let (si, sn) = match &args.shard {
        Some(s) => parse_shard(s)?,
        None => (1, 1),
    };
    let rows_bytes = read(&rows_path, "rows file")?;
    let model_bytes = read(&model_path, "model file")?;
    let file = model_path.display().to_string();
    let base: serde_json::Value = serde_json::from_slice(&model_bytes).map_err(|e| {
        bad_input(format!(
            "{file}:{}:{}: not valid JSON: {e}",
            e.line(),
            e.column()
        ))
    })?;
    let rows_text = String::from_utf8_lossy(&rows_bytes);
    let dir = rows_path.parent().unwrap_or(Path::new("."));
    let rows = parse_rows(&rows_text, &rows_path.display().to_string(), dir).map_err(bad_input)?;
    let mine = shard(&rows, si, sn);
    let weather = load_weather(&args.period.weather)?;
    let opts = SimOptions {
        step_s: args.period.step as f64 * 60.0,
        from: args.period.from,
        to: args.period.to,
        ..SimOptions::default()
    };
    let options_key = format!(
        "{:?}|{:?}|{:?}|{}|{}",
        args.period.weather,
        args.period.from,
        args.period.to,
        args.period.step,
        weather.times.len()
    );
    let manifest = Manifest {
        rows_hash: format!("{:016x}", fnv1a(&rows_bytes)),
        model_hash: format!("{:016x}", fnv1a(&model_bytes)),
        options_hash: format!("{:016x}", fnv1a(options_key.as_bytes())),
        shard: si,
        shards: sn,
        total_rows: rows.len(),
        shard_rows: mine.len(),
    };
    std::fs::create_dir_all(&out)
        .map_err(|e| anyhow::anyhow!("cannot create {}: {e}", out.display()))?;
    // Stream into a partial file; rename only when every row is written.
    let partial = out.join(".results.csv.partial");
    let mut w = std::io::BufWriter::new(std::fs::File::create(&partial)?);
    writeln!(w, "{RESULT_HEADER}")?;
    let bar = crate::progress::bar(mine.len() as u64, "variants", args.quiet);
    let started = std::time::Instant::now();
    let mut failed = 0usize;
    let mut hours = 0usize;
    let res = run_sweep(
        &base,
        &file,
        &mine,
        &weather,
        &opts,
        |r| {
            if r.status != "ok" {
                failed += 1;
            }
            hours += r.hours;
            writeln!(w, "{}", r.csv_line())
        },
        &|| bar.inc(1),
    );
    bar.finish_and_clear();
    let flushed = res.and_then(|_| w.flush());
    if let Err(e) = flushed {
        let _ = std::fs::remove_file(&partial);
        return Err(anyhow::anyhow!(
            "cannot write results in {}: {e}",
            out.display()
        ));
    }
    drop(w);
    std::fs::rename(&partial, out.join("results.csv"))?;
    dwell_report::OutputDir::create(&out)?.write(
        "sweep.json",
        serde_json::to_string_pretty(&manifest)?.as_bytes(),
    )?;
    let secs = started.elapsed().as_secs_f64();
    if !args.quiet {
        println!(
            "{} variants (shard {si}/{sn} of {} rows) in {secs:.1} s: {:.0} house-years per minute on {} cores; {failed} failed",
            mine.len(),
            rows.len(),
            hours as f64 / 8760.0 / secs.max(1e-9) * 60.0,
            std::thread::available_parallelism().map_or(1, usize::from)
        );
        println!("wrote {}", out.join("results.csv").display());
    }
    if failed > 0 {
        return Err(bad_input(format!(
            "{failed} variant(s) failed; their rows in {} say why (status column)",
            out.join("results.csv").display()
        )));
    }
    Ok(())
}

fn run_merge(dirs: &[PathBuf], out: &Path, quiet: bool) -> anyhow::Result<()> {
    let mut parts = Vec::new();
    for d in dirs {
        let mpath = d.join("sweep.json");
        let m: Manifest =
            serde_json::from_slice(&read(&mpath, "shard manifest")?).map_err(|e| {
                bad_input(format!(
                    "{}: not a dwell sweep manifest: {e}",
                    mpath.display()
                ))
            })?;
        let text = String::from_utf8(read(&d.join("results.csv"), "shard results")?)
            .map_err(|e| bad_input(format!("{}: {e}", d.display())))?;
        parts.push((m, text, d.display().to_string()));
    }
    let merged = merge(&parts).map_err(bad_input)?;
    let n = merged.lines().count() - 1;
    dwell_report::OutputDir::create(out)?.write("results.csv", merged.as_bytes())?;
    if !quiet {
        println!(
            "merged {} shards, {n} variants into {}",
            parts.len(),
            out.join("results.csv").display()
        );
    }
    Ok(())
}

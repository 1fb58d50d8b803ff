//! The `stratiprior` command line: parses arguments and calls the library.

use anyhow::Context;
use clap::{Parser, Subcommand, ValueEnum};
use std::io::IsTerminal;
use std::path::PathBuf;
use std::process::ExitCode;

/// Spatially varying priors of Vp0, Thomsen epsilon and delta for anisotropic FWI,
/// from sparse wells, interpreted horizons and facies.
#[derive(Parser, Debug)]
#[command(name = "stratiprior", version, about, long_about = None)]
struct Cli {
    #[command(subcommand)]
    command: Command,
}

#[derive(Subcommand, Debug)]
enum Command {
    /// Load a project and everything it names; print a summary of what was read.
    Check {
        /// The project file (TOML).
        project: PathBuf,
        /// Print the summary as JSON on standard output.
        #[arg(long)]
        json: bool,
        /// Print nothing but errors (the exit status tells the result).
        #[arg(long, short, conflicts_with = "json")]
        quiet: bool,
    },
    /// Build the prior: mean and standard-deviation volumes of Vp0, epsilon and
    /// delta by kriging in stratigraphic coordinates, a zone volume and manifest.json.
    Build {
        /// The project file (TOML).
        project: PathBuf,
        /// Output folder (default: the project's `output`).
        #[arg(long)]
        out: Option<PathBuf>,
        /// Worker threads (default: all cores). Results are identical for any count.
        #[arg(long)]
        threads: Option<usize>,
        /// Print the summary as JSON.
        #[arg(long)]
        json: bool,
        /// Print nothing but errors.
        #[arg(long, short, conflicts_with = "json")]
        quiet: bool,
    },
    /// Experimental variograms and fitted models per zone and property (JSON,
    /// SVG plots), printed in project-file syntax.
    Variogram {
        /// The project file (TOML).
        project: PathBuf,
        /// Folder to write into.
        #[arg(long)]
        out: PathBuf,
        /// Print the summary as JSON.
        #[arg(long)]
        json: bool,
        /// Print nothing but errors.
        #[arg(long, short, conflicts_with = "json")]
        quiet: bool,
    },
    /// Condition the wells (Vp0, epsilon, delta, zone, stratigraphic coordinate,
    /// facies per sample) and write each as LAS 2.0.
    Condition {
        /// The project file (TOML).
        project: PathBuf,
        /// Folder to write the LAS files into.
        #[arg(long)]
        out: PathBuf,
        /// Print the summary as JSON.
        #[arg(long)]
        json: bool,
        /// Print nothing but errors.
        #[arg(long, short, conflicts_with = "json")]
        quiet: bool,
    },
    /// Show what the tool reads from one input file.
    Inspect {
        /// The file: LAS, SEG-Y, horizon picks, well table, deviation survey or tops.
        file: PathBuf,
        /// The file's kind, when its name does not tell.
        #[arg(long, value_enum)]
        kind: Option<KindArg>,
        /// Print as JSON (for LAS, with every curve's values; nulls as null).
        #[arg(long)]
        json: bool,
    },
    /// Write the fictional demo basin (wells, horizons, volumes, project file, truth).
    Demo {
        /// Folder to write into.
        #[arg(long)]
        out: PathBuf,
        /// Seed of the generator.
        #[arg(long, default_value_t = stratiprior::demo::DEFAULT_SEED)]
        seed: u64,
        /// Print nothing but errors.
        #[arg(long, short)]
        quiet: bool,
    },
}

#[derive(Debug, Clone, Copy, ValueEnum)]
enum KindArg {
    Las,
    Segy,
    Picks,
    WellTable,
    Survey,
    Tops,
}

impl From<KindArg> for stratiprior::inspect::FileKind {
    fn from(k: KindArg) -> Self {
        use stratiprior::inspect::FileKind as F;
        match k {
            KindArg::Las => F::Las,
            KindArg::Segy => F::Segy,
            KindArg::Picks => F::Picks,
            KindArg::WellTable => F::WellTable,
            KindArg::Survey => F::Survey,
            KindArg::Tops => F::Tops,
        }
    }
}

fn run(cli: Cli) -> anyhow::Result<()> {
    match cli.command {
        Command::Check {
            project,
            json,
            quiet,
        } => {
            let progress = show_progress(json, quiet);
            let report = stratiprior::check::run(&project, progress)?;
            emit(&report, json, quiet, || report.render_text())?;
        }
        Command::Build {
            project,
            out,
            threads,
            json,
            quiet,
        } => {
            let progress = show_progress(json, quiet);
            let report = stratiprior::prior::build::build(
                &project,
                &stratiprior::prior::build::BuildOptions {
                    out,
                    threads,
                    progress,
                },
            )?;
            emit(&report, json, quiet, || report.render_text())?;
        }
        Command::Variogram {
            project,
            out,
            json,
            quiet,
        } => {
            let progress = show_progress(json, quiet);
            let report = stratiprior::commands::variogram::run(&project, &out, progress)?;
            emit(&report, json, quiet, || report.render_text())?;
        }
        Command::Condition {
            project,
            out,
            json,
            quiet,
        } => {
            let progress = show_progress(json, quiet);
            let report = stratiprior::commands::condition::run(&project, &out, progress)?;
            emit(&report, json, quiet, || report.render_text())?;
        }
        Command::Inspect { file, kind, json } => {
            let ins = stratiprior::inspect::inspect(&file, kind.map(Into::into), json)?;
            emit(&ins, json, false, || ins.render_text())?;
        }
        Command::Demo { out, seed, quiet } => {
            let report = stratiprior::demo::generate(&stratiprior::demo::DemoOptions {
                out_dir: out.clone(),
                seed,
            })
            .with_context(|| format!("writing the demo basin into {}", out.display()))?;
            if !quiet {
                println!("{}", serde_json::to_string_pretty(&report)?);
            }
        }
    }
    Ok(())
}

/// Progress bars only on a terminal, and not when output is scripted.
fn show_progress(json: bool, quiet: bool) -> bool {
    !quiet && !json && std::io::stderr().is_terminal()
}

/// Print a command's report: JSON, nothing, or its text rendering.
fn emit<T: serde::Serialize>(
    report: &T,
    json: bool,
    quiet: bool,
    text: impl FnOnce() -> String,
) -> anyhow::Result<()> {
    if json {
        println!("{}", serde_json::to_string_pretty(report)?);
    } else if !quiet {
        print!("{}", text());
    }
    Ok(())
}

fn main() -> ExitCode {
    let cli = Cli::parse();
    match run(cli) {
        Ok(()) => ExitCode::SUCCESS,
        Err(e) => {
            eprintln!("error: {e}");
            for cause in e.chain().skip(1) {
                eprintln!("  caused by: {cause}");
            }
            ExitCode::FAILURE
        }
    }
}

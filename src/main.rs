//! The `stratiprior` command line: parses arguments and calls the library.

use anyhow::Context;
use clap::{Parser, Subcommand, ValueEnum};
use std::io::{IsTerminal, Write};
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
        #[command(flatten)]
        output: Output,
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
        #[command(flatten)]
        output: Output,
    },
    /// Leave-one-well-out validation: rebuild the prior without each well in
    /// turn, predict along it and score against baselines (validation.csv/json).
    Validate {
        /// The project file (TOML).
        project: PathBuf,
        /// Folder to write into.
        #[arg(long)]
        out: PathBuf,
        /// Worker threads (default: all cores). Results are identical for any count.
        #[arg(long)]
        threads: Option<usize>,
        /// Refit the variograms without each held-out well (default: the full-data models).
        #[arg(long)]
        refit_variograms: bool,
        #[command(flatten)]
        output: Output,
    },
    /// Experimental variograms and fitted models per zone and property (JSON,
    /// SVG plots), printed in project-file syntax.
    Variogram {
        /// The project file (TOML).
        project: PathBuf,
        /// Folder to write into.
        #[arg(long)]
        out: PathBuf,
        #[command(flatten)]
        output: Output,
    },
    /// Condition the wells (Vp0, epsilon, delta, zone, stratigraphic coordinate,
    /// facies per sample) and write each as LAS 2.0.
    Condition {
        /// The project file (TOML).
        project: PathBuf,
        /// Folder to write the LAS files into.
        #[arg(long)]
        out: PathBuf,
        #[command(flatten)]
        output: Output,
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
        /// `field`: the committed demo (2.5 km x 3.5 km, 50 m bins); `regional`:
        /// the same basin and wells on a 7 km x 6 km survey (100 m bins) whose
        /// far part lies more than 1.5 km from every well.
        #[arg(long, value_enum, default_value_t = SurveyArg::Field)]
        survey: SurveyArg,
        /// Print nothing but errors.
        #[arg(long, short)]
        quiet: bool,
    },
}

/// The demo's survey.
#[derive(Debug, Clone, Copy, clap::ValueEnum)]
enum SurveyArg {
    /// The committed demo survey.
    Field,
    /// The regional survey around it.
    Regional,
}

/// How a command reports: text, JSON or nothing.
#[derive(clap::Args, Debug, Clone, Copy)]
struct Output {
    /// Print the summary as JSON on standard output.
    #[arg(long)]
    json: bool,
    /// Print nothing but errors (the exit status tells the result).
    #[arg(long, short, conflicts_with = "json")]
    quiet: bool,
}

impl Output {
    /// Progress bars only on a terminal, and not when output is scripted.
    fn progress(self) -> bool {
        !self.quiet && !self.json && std::io::stderr().is_terminal()
    }

    /// Print a command's report: JSON, nothing, or its text rendering.
    fn emit<T: serde::Serialize>(
        self,
        report: &T,
        text: impl FnOnce() -> String,
    ) -> anyhow::Result<()> {
        emit(report, self.json, self.quiet, text)
    }
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
        Command::Check { project, output } => {
            let progress = output.progress();
            let report = stratiprior::check::run(&project, progress)?;
            output.emit(&report, || report.render_text())?;
        }
        Command::Build {
            project,
            out,
            threads,
            output,
        } => {
            let progress = output.progress();
            let report = stratiprior::prior::build::build(
                &project,
                &stratiprior::prior::build::BuildOptions {
                    out,
                    threads,
                    progress,
                },
            )?;
            output.emit(&report, || report.render_text())?;
        }
        Command::Validate {
            project,
            out,
            threads,
            refit_variograms,
            output,
        } => {
            let progress = output.progress();
            let report = stratiprior::validation::loo::validate(
                &project,
                &stratiprior::validation::loo::ValidateOptions {
                    out,
                    threads,
                    progress,
                    refit_variograms,
                },
            )?;
            let pooled: Vec<_> = report.rows.iter().filter(|r| r.well == "all").collect();
            output.emit(&pooled, || report.render_text())?;
        }
        Command::Variogram {
            project,
            out,
            output,
        } => {
            let progress = output.progress();
            let report = stratiprior::commands::variogram::run(&project, &out, progress)?;
            output.emit(&report, || report.render_text())?;
        }
        Command::Condition {
            project,
            out,
            output,
        } => {
            let progress = output.progress();
            let report = stratiprior::commands::condition::run(&project, &out, progress)?;
            output.emit(&report, || report.render_text())?;
        }
        Command::Inspect { file, kind, json } => {
            let ins = stratiprior::inspect::inspect(&file, kind.map(Into::into), json)?;
            emit(&ins, json, false, || ins.render_text())?;
        }
        Command::Demo {
            out,
            seed,
            survey,
            quiet,
        } => {
            let report = stratiprior::demo::generate(&stratiprior::demo::DemoOptions {
                out_dir: out.clone(),
                seed,
                survey: match survey {
                    SurveyArg::Field => stratiprior::demo::DemoSurvey::Field,
                    SurveyArg::Regional => stratiprior::demo::DemoSurvey::Regional,
                },
            })
            .with_context(|| format!("writing the demo basin into {}", out.display()))?;
            emit(&report, true, quiet, String::new)?;
        }
    }
    Ok(())
}

/// Print a command's report: JSON, nothing, or its text rendering.
fn emit<T: serde::Serialize>(
    report: &T,
    json: bool,
    quiet: bool,
    text: impl FnOnce() -> String,
) -> anyhow::Result<()> {
    if quiet {
        return Ok(());
    }
    let out = if json {
        serde_json::to_string_pretty(report)? + "\n"
    } else {
        text()
    };
    let mut stdout = std::io::stdout().lock();
    match stdout
        .write_all(out.as_bytes())
        .and_then(|_| stdout.flush())
    {
        // a reader that stops early (`| head`) is not an error of ours
        Err(e) if e.kind() == std::io::ErrorKind::BrokenPipe => Ok(()),
        r => Ok(r?),
    }
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

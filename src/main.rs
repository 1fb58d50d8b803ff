//! The `stratiprior` command line: parses arguments and calls the library.

use clap::{Parser, Subcommand};

/// Spatially varying priors of Vp0, epsilon and delta for anisotropic FWI.
#[derive(Parser, Debug)]
#[command(name = "stratiprior", version, about)]
struct Cli {
    #[command(subcommand)]
    command: Command,
}

#[derive(Subcommand, Debug)]
enum Command {}

fn main() -> anyhow::Result<()> {
    let _cli = Cli::parse();
    Ok(())
}

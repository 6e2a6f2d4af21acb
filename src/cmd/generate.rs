//! `starsift generate`: regenerate the demo catalogue, or write a large
//! synthetic catalogue for benches.

use std::io::Write;
use std::path::PathBuf;

use crate::cli::error::CliError;
use crate::demo;

#[derive(Debug, clap::Args)]
pub struct Args {
    #[command(subcommand)]
    what: What,
}

#[derive(Debug, clap::Subcommand)]
enum What {
    /// The demo: catalogue.csv, survey.toml, truth.csv and light curves.
    Demo {
        /// Output folder.
        #[arg(long, default_value = "demo-catalogue")]
        out: PathBuf,
    },
    /// A large synthetic catalogue (16 columns, rows shuffled).
    Big {
        /// Number of candidates.
        #[arg(long, default_value_t = 1_000_000)]
        candidates: usize,
        #[arg(long, default_value_t = 42)]
        seed: u64,
        /// Output file.
        #[arg(long)]
        out: PathBuf,
    },
}

pub fn run(args: &Args, out: &mut dyn Write) -> Result<(), CliError> {
    match &args.what {
        What::Demo { out: dir } => {
            demo::write_demo(dir)?;
            writeln!(out, "wrote the demo to {}", dir.display())?;
        }
        What::Big {
            candidates,
            seed,
            out: path,
        } => {
            demo::write_big(path, *candidates, *seed)?;
            writeln!(out, "wrote {candidates} candidates to {}", path.display())?;
        }
    }
    Ok(())
}

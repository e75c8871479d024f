//! `siccant-kernel`: run the Jupyter kernel, or install / uninstall its kernelspec.

use std::path::PathBuf;
use std::process::ExitCode;

use clap::{Parser, Subcommand};
use siccant_kernel::kernelspec::{self, Target};

/// Jupyter kernel for siccant worksheets.
#[derive(Parser)]
#[command(name = "siccant-kernel", version, about)]
struct Cli {
    #[command(subcommand)]
    command: Command,
}

#[derive(Subcommand)]
enum Command {
    /// Run the kernel (Jupyter starts this from kernel.json).
    Run {
        /// The connection file written by the Jupyter client.
        #[arg(short = 'f', long = "connection-file")]
        connection_file: PathBuf,
    },
    /// Install the kernelspec (default: for the current user).
    Install(Where),
    /// Remove the kernelspec (default: the current user's).
    Uninstall(Where),
}

#[derive(clap::Args)]
struct Where {
    /// The current user's Jupyter data directory.
    #[arg(long, conflicts_with = "prefix")]
    user: bool,
    /// `DIR/share/jupyter` (for a virtual environment, use its directory).
    #[arg(long, value_name = "DIR")]
    prefix: Option<PathBuf>,
}

impl Where {
    fn target(&self) -> Target {
        match &self.prefix {
            Some(dir) => Target::Prefix(dir.clone()),
            None => Target::User,
        }
    }
}

fn main() -> ExitCode {
    let cli = Cli::parse();
    let result = match cli.command {
        Command::Run { connection_file } => run(&connection_file),
        Command::Install(w) => install(&w.target()),
        Command::Uninstall(w) => uninstall(&w.target()),
    };
    match result {
        Ok(()) => ExitCode::SUCCESS,
        Err(message) => {
            eprintln!("siccant-kernel: {message}");
            ExitCode::FAILURE
        }
    }
}

fn run(connection_file: &std::path::Path) -> Result<(), String> {
    let runtime = tokio::runtime::Builder::new_multi_thread()
        .worker_threads(2)
        .enable_all()
        .build()
        .map_err(|e| format!("cannot start the async runtime: {e}"))?;
    runtime
        .block_on(siccant_kernel::kernel::run(connection_file))
        .map_err(|e| e.to_string())?;
    // The evaluation thread may still be busy; the shutdown reply has gone out.
    std::process::exit(0)
}

fn install(target: &Target) -> Result<(), String> {
    let exe =
        std::env::current_exe().map_err(|e| format!("cannot find this program's path: {e}"))?;
    let dir = kernelspec::install(target, &exe)?;
    println!("installed the siccant kernelspec in {}", dir.display());
    Ok(())
}

fn uninstall(target: &Target) -> Result<(), String> {
    match kernelspec::uninstall(target)? {
        Some(dir) => println!("removed {}", dir.display()),
        None => println!(
            "no siccant kernelspec found in {}",
            kernelspec::spec_dir(target)?.display()
        ),
    }
    Ok(())
}

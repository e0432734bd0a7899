//! The `regwave` command line: parses arguments into the library's requests
//! ([`regwave::output::commands`]), prints what they return, draws progress (a bar when stderr is
//! a terminal, else a heartbeat line every 10 s once work runs that long), stops cleanly on
//! SIGINT and SIGTERM (exit codes 130 and 143), and maps errors to exit codes (2: bad input, 1: a
//! computation failed or a check did not pass).

use clap::{Args, Parser, Subcommand};
use indicatif::{ProgressBar, ProgressStyle};
use regwave::checks::audit::AuditError;
use regwave::eigenfunction::profile::ProfileError;
use regwave::input::selection::SelectionError;
use regwave::output::commands::{self as run, CommandError, Outcome};
use regwave::output::files::FileError;
use regwave::precision::PrecisionError;
use regwave::progress::{Heartbeat, Observer, Progress, Stage};
use std::io::IsTerminal;
use std::process::ExitCode;
use std::time::Duration;

/// Interval of the heartbeat lines when no progress bar is drawn.
const HEARTBEAT: Duration = Duration::from_secs(10);

#[derive(Parser)]
#[command(
    name = "regwave",
    version,
    about = "Eigenfunctions of quantized mirror curves at hbar = 2 pi from regulators (numerical evidence, not proofs)"
)]
struct Cli {
    #[command(subcommand)]
    command: Command,
}

#[derive(Subcommand)]
enum Command {
    /// The catalogue of reflexive polygons: 15 strip families and the one excluded.
    #[command(
        after_help = "Examples:\n  regwave families\n  regwave families --json > families.json"
    )]
    Families {
        #[command(flatten)]
        json: Json,
    },
    /// Independent eigenvalues from a harmonic-oscillator basis, with convergence estimates.
    #[command(
        after_help = "Examples:\n  regwave spectrum --family F0 --levels 0..4 --digits 20\n  regwave spectrum --vertices \"(1,0),(0,1),(-1,-1)\" --levels 0 --json"
    )]
    Spectrum {
        #[command(flatten)]
        request: run::SpectrumRequest,
        #[command(flatten)]
        json: Json,
    },
    /// Periods Omega, regulator periods R over the cycles alpha and beta, tau and nu at one modulus.
    #[command(
        after_help = "Examples:\n  regwave periods --family P2 --modulus 12.970039821793337437623954 --digits 30\n  regwave periods --family dP3 --modulus 50 --json"
    )]
    Periods {
        #[command(flatten)]
        request: run::PeriodsRequest,
        #[command(flatten)]
        json: Json,
    },
    /// Attractor moduli: the moduli where the higher normal function nu is an integer.
    #[command(
        after_help = "Examples:\n  regwave attractors --family F0 --levels 0..9 --digits 40\n  regwave attractors --family F0* --levels 3 --json"
    )]
    Attractors {
        #[command(flatten)]
        request: run::AttractorsRequest,
        #[command(flatten)]
        json: Json,
    },
    /// Build the eigenfunction psi at an attractor modulus and write psi.csv (+ strip lines) and psi.json.
    #[command(
        after_help = "Examples:\n  regwave build --family dP3 --level 2 --grid=-12:12:481 --strip --out out/dp3-2\n  regwave build --family F0 --level 2 --digits 40 --strip --out out/f0-40 --json"
    )]
    Build {
        #[command(flatten)]
        request: run::BuildRequest,
        #[command(flatten)]
        json: Json,
    },
    /// Audit a family: attractor moduli matched to the independent spectrum both ways, every level's eigenfunction checked; Markdown, JSON, tables and figures.
    #[command(
        after_help = "Examples:\n  regwave audit --family P2 --levels 0..4\n  regwave audit --family F0 --levels 0..2 --digits 30 --out out/f0-30 --png"
    )]
    Audit {
        #[command(flatten)]
        request: run::AuditRequest,
        #[command(flatten)]
        json: Json,
    },
    /// The residual report of one eigenfunction (all checks), without writing samples.
    #[command(
        after_help = "Examples:\n  regwave check --family F0 --level 2\n  regwave check --family F0 --modulus 17.9 --allow-non-attractor --json"
    )]
    Check {
        #[command(flatten)]
        request: run::CheckRequest,
        #[command(flatten)]
        json: Json,
    },
    /// The built-in demonstration, written into out/tour/.
    #[command(after_help = "Examples:\n  regwave tour\n  regwave tour --out /tmp/tour --png")]
    Tour(run::TourRequest),
}

#[derive(Args, Clone, Copy)]
struct Json {
    /// Print one JSON document instead of the table.
    #[arg(long)]
    json: bool,
}

fn main() -> ExitCode {
    #[cfg(unix)]
    stop_cleanly_on_signals();
    match execute(Cli::parse().command) {
        Ok(()) => ExitCode::SUCCESS,
        Err(e) => {
            eprintln!("regwave: error: {}", message(&e));
            ExitCode::from(exit_code(&e))
        }
    }
}

fn execute(command: Command) -> Result<(), CommandError> {
    match command {
        Command::Families { json } => show(json, &run::families()),
        Command::Spectrum { request, json } => {
            barless("spectrum", json, || run::spectrum(&request))
        }
        Command::Periods { request, json } => barless("periods", json, || run::periods(&request)),
        Command::Attractors { request, json } => {
            barless("attractors", json, || run::attractors(&request))
        }
        Command::Check { request, json } => barless("check", json, || run::check(&request)),
        Command::Build { request, json } => {
            let bar = progress_bar(json.json || request.digits <= 16, "build");
            let outcome = observed("build", &bar, |observe| run::build(&request, observe))?;
            bar.finish_and_clear();
            if json.json {
                show(json, &outcome)?;
            }
            wrote("build", &outcome);
            Ok(())
        }
        Command::Audit { request, json } => {
            let bar = progress_bar(json.json, "audit");
            let outcome = observed("audit", &bar, |observe| run::audit(&request, observe))?;
            bar.finish_and_clear();
            show(json, &outcome)?;
            if !json.json {
                wrote("audit", &outcome);
            }
            outcome.finding.map_or(Ok(()), Err)
        }
        Command::Tour(request) => {
            eprintln!(
                "regwave tour: auditing {} ...",
                run::TOUR_FAMILIES.join(", ")
            );
            let bar = progress_bar(false, "tour");
            let outcome = observed("tour", &bar, |observe| {
                run::tour(&request, &|p: &Progress| {
                    observe(p);
                    if matches!(p.stage, Stage::FamilyAudited(_))
                        && p.done == run::TOUR_FAMILIES.len()
                    {
                        bar.suspend(|| {
                            eprintln!("regwave tour: the high-precision eigenfunction ...")
                        });
                    }
                })
            })?;
            bar.finish_and_clear();
            wrote("tour", &outcome);
            Ok(())
        }
    }
}

/// Runs a command that reports no stages (so draws no bar, only the heartbeat) and shows its
/// outcome.
fn barless(
    label: &str,
    json: Json,
    work: impl FnOnce() -> Result<Outcome, CommandError>,
) -> Result<(), CommandError> {
    show(json, &observed(label, &ProgressBar::hidden(), |_| work())?)
}

/// Runs `work` with an observer that draws `bar` and, while `bar` is hidden (stderr not a
/// terminal, or quiet output), a heartbeat: a line on stderr every [`HEARTBEAT`] once the work
/// has run that long ("regwave build: still working, 20 s; last finished: modulus (1/2)").
fn observed<T>(label: &str, bar: &ProgressBar, work: impl FnOnce(Observer<'_>) -> T) -> T {
    /// Stops the heartbeat also when the work unwinds, so that the scope can end.
    struct Stop<'a>(&'a Heartbeat);
    impl Drop for Stop<'_> {
        fn drop(&mut self) {
            self.0.stop();
        }
    }
    let heartbeat = Heartbeat::new(HEARTBEAT);
    std::thread::scope(|s| {
        if bar.is_hidden() {
            s.spawn(|| {
                while let Some(line) = heartbeat.next_line() {
                    eprintln!("regwave {label}: {line}");
                }
            });
        }
        let _stop = Stop(&heartbeat);
        work(&|p: &Progress| {
            tick(bar, p);
            heartbeat.observe(p);
        })
    })
}

/// SIGINT and SIGTERM stop the program cleanly: a set of outputs being written is first
/// completed or rolled back ([`regwave::output::files::try_stop_writing`]), so neither a
/// partial set nor a staging folder is left; then one line on stderr and exit code 128 + the
/// signal (130, 143). A second signal while waiting for the write stops at once.
#[cfg(unix)]
fn stop_cleanly_on_signals() {
    use signal_hook::consts::{SIGINT, SIGTERM};
    let Ok(mut signals) = signal_hook::iterator::Signals::new([SIGINT, SIGTERM]) else {
        return;
    };
    std::thread::spawn(move || {
        let Some(signal) = signals.forever().next() else {
            return;
        };
        let mut whole = true;
        while !regwave::output::files::try_stop_writing() {
            if signals.pending().next().is_some() {
                whole = false;
                break;
            }
            std::thread::sleep(Duration::from_millis(10));
        }
        let name = if signal == SIGINT {
            "SIGINT"
        } else {
            "SIGTERM"
        };
        // Over a progress bar on a terminal: clear its line first.
        let clear = if std::io::stderr().is_terminal() {
            "\r\x1b[2K"
        } else {
            ""
        };
        if whole {
            eprintln!("{clear}regwave: stopped by {name}; no partial outputs left");
        } else {
            eprintln!("{clear}regwave: stopped by {name} while moving outputs in; they may be incomplete (the old files are in the hidden staging folder)");
        }
        std::process::exit(128 + signal);
    });
}

/// Prints the JSON document or the text. A reader that stops early (`| head`) is not an error.
fn show(json: Json, outcome: &Outcome) -> Result<(), CommandError> {
    use std::io::Write;
    let mut out = std::io::stdout().lock();
    let _ = if json.json {
        writeln!(out, "{}", outcome.json)
    } else {
        write!(out, "{}", outcome.text)
    }
    .and_then(|_| out.flush());
    Ok(())
}

/// Says on stderr where the outputs went.
fn wrote(command: &str, outcome: &Outcome) {
    if let Some(dir) = &outcome.wrote {
        eprintln!(
            "regwave {command}: wrote {} ({:.2} s)",
            dir.display(),
            outcome.elapsed_s
        );
    }
}

/// A progress bar on stderr when it is a terminal and output is not quiet; hidden otherwise.
fn progress_bar(quiet: bool, label: &str) -> ProgressBar {
    if quiet || !std::io::stderr().is_terminal() {
        return ProgressBar::hidden();
    }
    let bar = ProgressBar::new(1);
    bar.set_style(
        ProgressStyle::with_template("{prefix} [{bar:30}] {pos}/{len} {msg} ({elapsed})")
            .expect("a valid template")
            .progress_chars("=> "),
    );
    bar.set_prefix(label.to_string());
    bar
}

/// Shows one progress event.
fn tick(bar: &ProgressBar, p: &Progress) {
    bar.set_length(p.total as u64);
    bar.set_position(p.done as u64);
    bar.set_message(p.stage.to_string());
}

/// 2 for bad input, 1 for a computation that failed or a check that did not pass.
fn exit_code(e: &CommandError) -> u8 {
    if e.is_input() {
        2
    } else {
        1
    }
}

/// The error message, naming the command-line flags where the library's message cannot.
fn message(e: &CommandError) -> String {
    use CommandError as E;
    match e {
        E::Precision(PrecisionError::DigitsOutOfRange { digits, min, max }) => {
            format!("--digits {digits} is outside the supported range [{min}, {max}]")
        }
        E::Selection(SelectionError::Ambiguous) => {
            "give either --family or --vertices, not both".into()
        }
        E::Selection(SelectionError::Missing) => {
            "give --family ID or --vertices \"(1,0),(0,1),(-1,-1)\"".into()
        }
        E::Profile(p @ ProfileError::NotAttractor { .. })
        | E::Audit(AuditError::Profile(p @ ProfileError::NotAttractor { .. })) => format!(
            "{p}; give --level n, or --allow-non-attractor to build anyway (the result is then not an eigenfunction)"
        ),
        E::Files(FileError::Exists { path }) => format!("{path} exists; use --force to replace it"),
        E::NoTarget => "give --level n or --modulus A".into(),
        e => e.to_string(),
    }
}

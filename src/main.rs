//! The `railcheck` command: parses arguments, reads files, prints reports and
//! sets the exit code. Everything else lives in the library.

use clap::{Parser, Subcommand, ValueEnum};
use railcheck::model::Library;
use railcheck::report::{self, HumanStyle};
use railcheck::rules::Severity;
use std::io::{IsTerminal, Write};
use std::path::{Path, PathBuf};
use std::process::ExitCode;

#[derive(Parser)]
#[command(
    name = "railcheck",
    version,
    about = "Checks a robot's wiring plan before first power-on"
)]
struct Cli {
    #[command(subcommand)]
    command: Command,
}

/// Where a plan comes from and how to read it.
#[derive(clap::Args)]
struct PlanArgs {
    /// The plan (YAML netlist).
    file: PathBuf,
    /// Output format.
    #[arg(long, value_enum, default_value_t = Format::Human)]
    format: Format,
    /// A folder of extra part files; its ids shadow built-in ones.
    #[arg(long, value_name = "DIR")]
    parts: Option<PathBuf>,
}

#[derive(Subcommand)]
enum Command {
    /// Check a plan: rails, currents, grounds, ratings.
    Check {
        #[command(flatten)]
        plan: PlanArgs,
        /// Fail on warnings too.
        #[arg(long)]
        strict: bool,
        /// Also write the plan's block diagram to this SVG file.
        #[arg(long, value_name = "OUT.svg")]
        diagram: Option<PathBuf>,
    },
    /// Draw the plan's block diagram as SVG (or PNG) for build notes.
    Draw {
        #[command(flatten)]
        plan: PlanArgs,
        /// The SVG file to write.
        #[arg(
            short = 'o',
            long = "output",
            value_name = "OUT.svg",
            required_unless_present = "png"
        )]
        output: Option<PathBuf>,
        /// Also (or instead) write the diagram as a PNG picture.
        #[arg(long, value_name = "OUT.png")]
        png: Option<PathBuf>,
    },
    /// Show the power budget: per rail and per battery.
    Budget {
        #[command(flatten)]
        plan: PlanArgs,
    },
    /// List the rules, or explain one (`railcheck rules fuse/undersized`).
    Rules {
        /// A rule id.
        id: Option<String>,
    },
}

#[derive(Clone, Copy, ValueEnum, PartialEq, Eq)]
enum Format {
    Human,
    Json,
    /// SARIF 2.1.0 for code-scanning services (`check` and `draw` only).
    Sarif,
}

const EXIT_FINDINGS: u8 = 1;
const EXIT_INPUT: u8 = 2;

fn main() -> ExitCode {
    let cli = Cli::parse();
    match cli.command {
        Command::Check {
            plan,
            strict,
            diagram,
        } => check(&plan, strict, diagram.as_deref()),
        Command::Draw { plan, output, png } => draw(&plan, output.as_deref(), png.as_deref()),
        Command::Budget { plan } => budget(&plan),
        Command::Rules { id } => rules(id.as_deref()),
    }
}

fn fail(message: &str) -> ExitCode {
    eprintln!("railcheck: {message}");
    ExitCode::from(EXIT_INPUT)
}

/// Like `fail`, and under a machine-readable format also prints the one
/// document that format promises, as an input error with no position.
fn fail_as(args: &PlanArgs, message: &str) -> ExitCode {
    let file = args.file.display().to_string();
    match args.format {
        Format::Json => emit(&report::unplaced_input_error_json(&file, message)),
        Format::Sarif => emit(&report::unplaced_input_error_sarif(
            &file,
            railcheck::rules::RULES,
            message,
        )),
        Format::Human => {}
    }
    fail(message)
}

fn emit(text: &str) {
    let mut stdout = std::io::stdout().lock();
    // A closed pipe (`railcheck check x | head`) is not an error worth a panic.
    let _ = stdout.write_all(text.as_bytes());
    let _ = stdout.flush();
}

fn style() -> HumanStyle {
    HumanStyle {
        color: std::io::stdout().is_terminal() && std::env::var_os("NO_COLOR").is_none(),
        width: 100,
    }
}

/// Reads and checks the plan; on input errors prints them and returns the
/// exit code to end with.
fn load(args: &PlanArgs) -> Result<railcheck::Checked, ExitCode> {
    let bytes = match std::fs::read(&args.file) {
        Ok(bytes) => bytes,
        Err(e) => {
            let message = format!("cannot read {}: {e}", args.file.display());
            return Err(fail_as(args, &message));
        }
    };
    let name = args.file.display().to_string();
    let text = railcheck::decode(&name, bytes).map_err(|failure| report_input(args, &failure))?;
    let mut library = Library::builtin();
    if let Some(dir) = &args.parts
        && let Err(message) = add_user_parts(&mut library, dir)
    {
        return Err(fail_as(args, &message));
    }
    railcheck::check(&name, &text, &library).map_err(|failure| report_input(args, &failure))
}

/// Prints input problems in the chosen format; the run ends with exit code 2.
fn report_input(args: &PlanArgs, failure: &railcheck::InputFailure) -> ExitCode {
    let out = match args.format {
        Format::Json => {
            report::input_errors_json(&failure.sources, failure.plan_source, &failure.errors)
        }
        Format::Sarif => {
            report::input_errors_sarif(&failure.sources, railcheck::rules::RULES, &failure.errors)
        }
        Format::Human => report::render_input_errors(&failure.sources, &failure.errors, style()),
    };
    emit(&out);
    ExitCode::from(EXIT_INPUT)
}

fn check(args: &PlanArgs, strict: bool, diagram: Option<&Path>) -> ExitCode {
    let checked = match load(args) {
        Ok(c) => c,
        Err(code) => return code,
    };
    // The diagram is written first, so that a failure to write it is the one
    // document a machine-readable format prints.
    if let Some(path) = diagram {
        let svg = railcheck::diagram::draw(&checked);
        if let Err(message) = write_output(path, &args.file, svg.as_bytes()) {
            return fail_as(args, &message);
        }
    }
    let out = match args.format {
        Format::Sarif => report::findings_sarif(
            &checked.sources,
            railcheck::rules::RULES,
            &checked.findings,
            &railcheck::safety::cautions(&checked.plan),
        ),
        Format::Json => report::findings_json(
            &checked.sources,
            checked.plan_source,
            &checked.findings,
            &railcheck::safety::cautions(&checked.plan),
        ),
        Format::Human => report::render_findings(
            &checked.sources,
            checked.plan_source,
            &checked.findings,
            &railcheck::safety::cautions(&checked.plan),
            style(),
        ),
    };
    emit(&out);
    let failing = checked
        .findings
        .iter()
        .any(|f| f.severity == Severity::Error || (strict && f.severity == Severity::Warning));
    if failing {
        ExitCode::from(EXIT_FINDINGS)
    } else {
        ExitCode::SUCCESS
    }
}

fn draw(args: &PlanArgs, output: Option<&Path>, png: Option<&Path>) -> ExitCode {
    let checked = match load(args) {
        Ok(c) => c,
        Err(code) => return code,
    };
    let svg = railcheck::diagram::draw(&checked);
    if let Some(path) = output
        && let Err(message) = write_output(path, &args.file, svg.as_bytes())
    {
        return fail_as(args, &message);
    }
    if let Some(path) = png {
        let mut options = resvg::usvg::Options::default();
        options.fontdb_mut().load_system_fonts();
        let written = railcheck::diagram::png(&svg, &options)
            .map_err(|e| e.to_string())
            .and_then(|bytes| write_output(path, &args.file, &bytes));
        if let Err(message) = written {
            return fail_as(args, &message);
        }
    }
    ExitCode::SUCCESS
}

/// Writes a file whole or not at all: into a temporary file in the same
/// folder, then renamed over the target. Never writes over the plan itself.
fn write_output(path: &Path, plan: &Path, bytes: &[u8]) -> Result<(), String> {
    if is_same_file(path, plan) {
        return Err(format!(
            "refusing to write the diagram over the plan {}",
            plan.display()
        ));
    }
    let folder = match path.parent() {
        Some(p) if !p.as_os_str().is_empty() => p,
        _ => Path::new("."),
    };
    let cannot = |e: std::io::Error| format!("cannot write {}: {e}", path.display());
    let mut file = tempfile::NamedTempFile::new_in(folder).map_err(cannot)?;
    file.write_all(bytes).map_err(cannot)?;
    // A temporary file is private to its owner; a diagram is for sharing.
    #[cfg(unix)]
    {
        use std::os::unix::fs::PermissionsExt;
        file.as_file()
            .set_permissions(std::fs::Permissions::from_mode(0o644))
            .map_err(cannot)?;
    }
    file.persist(path).map_err(|e| cannot(e.error))?;
    Ok(())
}

/// Whether two paths name one file (through links too). A path that does
/// not exist yet names no existing file.
fn is_same_file(a: &Path, b: &Path) -> bool {
    let (Ok(ma), Ok(mb)) = (std::fs::metadata(a), std::fs::metadata(b)) else {
        return false;
    };
    #[cfg(unix)]
    {
        use std::os::unix::fs::MetadataExt;
        if ma.dev() == mb.dev() && ma.ino() == mb.ino() {
            return true;
        }
    }
    let _ = (ma, mb);
    matches!((a.canonicalize(), b.canonicalize()), (Ok(x), Ok(y)) if x == y)
}

fn budget(args: &PlanArgs) -> ExitCode {
    if args.format == Format::Sarif {
        use clap::CommandFactory;
        Cli::command()
            .error(
                clap::error::ErrorKind::InvalidValue,
                "`budget` has no SARIF form (SARIF carries findings): use `--format json` or `human`",
            )
            .exit();
    }
    let checked = match load(args) {
        Ok(c) => c,
        Err(code) => return code,
    };
    let budget = railcheck::budget::budget(&checked);
    let name = checked.sources.name(checked.plan_source);
    emit(&match args.format {
        Format::Json => report::budget_json(name, &budget),
        Format::Human | Format::Sarif => report::budget_table(name, &budget),
    });
    // A plan whose operating point could not be solved has no budget.
    if budget.solved {
        ExitCode::SUCCESS
    } else {
        ExitCode::from(EXIT_FINDINGS)
    }
}

fn rules(id: Option<&str>) -> ExitCode {
    match id {
        None => {
            emit(&report::rule_list(railcheck::rules::RULES));
            ExitCode::SUCCESS
        }
        Some(id) => match railcheck::rules::rule(id) {
            Some(rule) => {
                emit(&report::rule_explanation(rule));
                ExitCode::SUCCESS
            }
            None => fail(&format!("no rule `{id}`; `railcheck rules` lists them all")),
        },
    }
}

/// Reads every `.yaml` file below `dir` into the library, id = relative path
/// without `.yaml`.
fn add_user_parts(library: &mut Library, dir: &Path) -> Result<(), String> {
    let mut stack = vec![dir.to_path_buf()];
    let mut files = Vec::new();
    while let Some(folder) = stack.pop() {
        let entries = std::fs::read_dir(&folder)
            .map_err(|e| format!("cannot read parts folder {}: {e}", folder.display()))?;
        for entry in entries {
            let path = entry
                .map_err(|e| format!("cannot read {}: {e}", folder.display()))?
                .path();
            if path.is_dir() {
                stack.push(path);
            } else if path.extension().and_then(|e| e.to_str()) == Some("yaml") {
                files.push(path);
            }
        }
    }
    files.sort();
    for path in files {
        let text = std::fs::read_to_string(&path)
            .map_err(|e| format!("cannot read {}: {e}", path.display()))?;
        let relative = path.strip_prefix(dir).unwrap_or(&path).with_extension("");
        let id = relative
            .components()
            .map(|c| c.as_os_str().to_string_lossy().into_owned())
            .collect::<Vec<_>>()
            .join("/");
        library.insert(id, path.display().to_string(), text);
    }
    Ok(())
}

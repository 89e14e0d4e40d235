//! The `railcheck` command: parses arguments, reads files, prints reports and
//! sets the exit code. Everything else lives in the library.

use clap::{CommandFactory, Parser, Subcommand, ValueEnum};
use railcheck::model::Library;
use railcheck::report::{self, HumanStyle};
use railcheck::rules::Severity;
use railcheck::syntax;
use std::io::{IsTerminal, Write};
use std::mem::ManuallyDrop;
use std::path::{Path, PathBuf};
use std::process::ExitCode;

mod cli;
use cli::files::*;
use cli::sweep::sweep;

/// Shown under `--help` of the command and of `check`.
const EXIT_CODES: &str = "\
Exit codes:
  0  no errors (warnings and notes allowed unless --strict)
  1  errors found (or warnings with --strict); for budget, no operating point
  2  the plan could not be read, a file could not be written, or a usage error";

#[derive(Parser)]
#[command(
    name = "railcheck",
    version,
    about = "Checks a robot's wiring plan before first power-on",
    after_help = EXIT_CODES
)]
struct Cli {
    /// When to colour the report: `auto` colours a terminal unless NO_COLOR is
    /// set or TERM is `dumb`.
    #[arg(
        long,
        value_enum,
        global = true,
        value_name = "WHEN",
        default_value_t = ColorWhen::Auto
    )]
    color: ColorWhen,
    #[command(subcommand)]
    command: Command,
}

#[derive(Clone, Copy, ValueEnum, PartialEq, Eq)]
enum ColorWhen {
    Auto,
    Always,
    Never,
}

/// Where a plan comes from and how to read it.
#[derive(clap::Args)]
struct PlanArgs {
    /// The plan (YAML netlist); `-` reads it from standard input. Plans larger
    /// than 64 MiB are refused.
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
    #[command(after_help = EXIT_CODES)]
    Check {
        #[command(flatten)]
        plan: PlanArgs,
        /// Fail on warnings too.
        #[arg(long)]
        strict: bool,
        /// Print only the summary line of the terminal report; the exit code
        /// is unchanged.
        #[arg(short, long)]
        quiet: bool,
        /// Also write the plan's block diagram to this SVG file.
        #[arg(long, value_name = "OUT.svg")]
        diagram: Option<PathBuf>,
    },
    /// Draw the plan's block diagram as SVG, PNG or PDF for build notes.
    ///
    /// One of `-o/--output`, `--png` and `--pdf` is required. With `--page`
    /// (and always for `--pdf`) the diagram is fitted to that paper with no
    /// text under 7 pt, over several sheets when it must be: the PDF has a
    /// page per sheet, and SVG and PNG a file per sheet (`-o rover.svg`
    /// writes rover-1.svg, rover-2.svg, …; one sheet keeps the name given).
    #[command(group(
        clap::ArgGroup::new("target").args(["output", "png", "pdf"]).required(true).multiple(true)
    ))]
    Draw {
        #[command(flatten)]
        plan: PlanArgs,
        /// The SVG file to write; `-` writes it to standard output. With
        /// --page and more than one sheet, one file per sheet: OUT-1.svg,
        /// OUT-2.svg, … (each written whole; never over the plan).
        #[arg(short = 'o', long = "output", value_name = "OUT.svg")]
        output: Option<PathBuf>,
        /// Also (or instead) write the diagram as a PNG picture (with --page
        /// and several sheets, one per sheet: OUT-1.png, OUT-2.png, …).
        #[arg(long, value_name = "OUT.png")]
        png: Option<PathBuf>,
        /// Also (or instead) write the diagram as a vector PDF, one page per sheet.
        #[arg(long, value_name = "OUT.pdf")]
        pdf: Option<PathBuf>,
        /// Fit the diagram to this paper (default for --pdf: the smallest
        /// that holds the drawing uncut).
        #[arg(long, value_enum)]
        page: Option<PaperArg>,
        /// Turn the page: long side across.
        #[arg(long, requires = "page")]
        landscape: bool,
    },
    /// Show the power budget: per rail and per battery.
    Budget {
        #[command(flatten)]
        plan: PlanArgs,
        /// Print only one summary line per battery.
        #[arg(short, long)]
        quiet: bool,
    },
    /// List every wire to cut and connector to crimp: runs in cutting order
    /// with size, length, currents, fuse and drop; metres of each size to
    /// buy; connector pinouts.
    Wires {
        #[command(flatten)]
        plan: PlanArgs,
    },
    /// List the power scenarios: the plan's own, each switch open, each
    /// supply from outside connected with the batteries in and out; for
    /// each, the nets that lose power and the parts that go off.
    Scenarios {
        #[command(flatten)]
        plan: PlanArgs,
    },
    /// Write the build notes: title block, verdict, safety cautions, findings
    /// with their fixes, the diagram, the power budget, the wire list and the
    /// connector pinouts, as one self-contained HTML file (or Markdown with
    /// the diagram as an SVG file beside it).
    Notes {
        /// The plan (YAML netlist); `-` reads it from standard input.
        file: PathBuf,
        /// The notes file to write (`notes.html`, or `notes.md` with
        /// `--format markdown`, which also writes `notes.svg` beside it);
        /// `-` writes HTML to standard output.
        #[arg(short = 'o', long = "output", value_name = "OUT")]
        output: PathBuf,
        /// Document format.
        #[arg(long, value_enum, default_value_t = NotesFormat::Html)]
        format: NotesFormat,
        /// The paper the HTML notes print on.
        #[arg(long, value_enum, default_value_t = NotesPaper::A4)]
        page: NotesPaper,
        /// A folder of extra part files; its ids shadow built-in ones.
        #[arg(long, value_name = "DIR")]
        parts: Option<PathBuf>,
    },
    /// Write the first power-on procedure: checks before power, the bench
    /// supply's voltage and current limit, the reading to expect on each rail,
    /// then motors, the stop and the battery.
    Bringup {
        #[command(flatten)]
        plan: PlanArgs,
    },
    /// Check every combination of design choices and tabulate which pass.
    ///
    /// Each combination is the plan with the chosen values written in,
    /// checked like `railcheck check` would; rows that pass come first.
    #[command(after_help = SWEEP_HELP)]
    Sweep {
        #[command(flatten)]
        plan: PlanArgs,
        /// A design choice and the values to try, `KEY=V1,V2,…`; repeat for
        /// more. KEY is a part (its library id: `pack=battery/lipo-3s,battery/lipo-4s`),
        /// a part's field (`buck.current=3 A,5 A`), a net's field
        /// (`VMOT.wire=16 AWG,14 AWG`), several nets' field at once
        /// (`VMOT+GND_MOT.wire=18 AWG,16 AWG`), a limit
        /// (`limits.wire_drop=3 %,5 %`) or a mode's length
        /// (`modes.climb.lasts=2 s,4 s`). Adds to, or replaces, the plan's
        /// `sweep:` section.
        #[arg(long = "vary", value_name = "KEY=V1,V2,…")]
        vary: Vec<String>,
        /// Order the passing rows (and the failing ones) by runtime (longest
        /// first), peak battery current, mass or cost (lowest first); without
        /// it, fewest warnings first, then in combination order. With
        /// `--format csv` or `json-lines` rows stream in combination order
        /// and the ranking picks the best.
        #[arg(long, value_enum, value_name = "BY")]
        rank: Option<RankBy>,
        /// Show only the combinations that pass.
        #[arg(long)]
        only_passing: bool,
        /// Count warnings as failing too.
        #[arg(long)]
        strict: bool,
        /// The most combinations to check.
        #[arg(long, value_name = "N", default_value_t = railcheck::sweep::MAX_COMBINATIONS)]
        max: usize,
        /// How many combinations to check at once (default: one per core).
        #[arg(long, value_name = "N")]
        jobs: Option<usize>,
        /// Write the best passing combination (the first row, or the best by
        /// `--rank` when rows stream) as a whole plan.
        #[arg(long, value_name = "OUT.yaml")]
        write_best: Option<PathBuf>,
        /// No progress bar and no line saying how many combinations run.
        #[arg(long, short = 'q')]
        quiet: bool,
    },
    /// List the rules, or explain one (`railcheck rules fuse/undersized`).
    Rules {
        /// A rule id.
        id: Option<String>,
    },
    /// Print the JSON Schema of the plan format, for YAML editors.
    Schema,
    /// List the parts library, or show one part whole
    /// (`railcheck parts regulator/buck-5v-3a`).
    Parts {
        /// A part id.
        id: Option<String>,
        /// A folder of extra part files; its ids shadow built-in ones.
        #[arg(long, value_name = "DIR")]
        parts: Option<PathBuf>,
    },
    /// Write a commented starter plan that passes `check`.
    ///
    /// Never overwrites an existing file.
    Init {
        /// The library battery to start from (`railcheck parts` lists them).
        #[arg(long, value_name = "ID", default_value = railcheck::starter::DEFAULT_BATTERY)]
        battery: String,
        /// The file to write; without it the plan goes to standard output.
        #[arg(short = 'o', long = "output", value_name = "FILE")]
        output: Option<PathBuf>,
    },
    /// Print a shell completion script (`railcheck completions bash > …`).
    Completions {
        /// The shell to complete in.
        shell: clap_complete::Shell,
    },
    /// Print the manual page (roff) on standard output.
    Man,
}

/// Paper sizes for `draw --page`.
#[derive(Clone, Copy, ValueEnum, PartialEq, Eq)]
enum PaperArg {
    /// ISO A4, 210 × 297 mm.
    A4,
    /// ISO A3, 297 × 420 mm.
    A3,
    /// US Letter, 8.5 × 11 in.
    Letter,
    /// US Tabloid, 11 × 17 in.
    Tabloid,
}

impl PaperArg {
    fn paper(self) -> railcheck::diagram::Paper {
        use railcheck::diagram::Paper;
        match self {
            PaperArg::A4 => Paper::A4,
            PaperArg::A3 => Paper::A3,
            PaperArg::Letter => Paper::Letter,
            PaperArg::Tabloid => Paper::Tabloid,
        }
    }
}

/// Where `draw` writes, and on what paper.
struct DrawTargets<'a> {
    output: Option<&'a Path>,
    png: Option<&'a Path>,
    pdf: Option<&'a Path>,
    page: Option<railcheck::diagram::Page>,
}

#[derive(Clone, Copy, ValueEnum, PartialEq, Eq)]
enum Format {
    Human,
    Json,
    /// SARIF 2.1.0 for code-scanning services (`check` and `draw` only).
    Sarif,
    /// CSV rows for a spreadsheet (`wires` and `sweep`).
    Csv,
    /// One JSON object per line, streamed as rows finish (`sweep` only).
    JsonLines,
    /// A Markdown checklist (`bringup` only).
    Markdown,
}

#[derive(Clone, Copy, ValueEnum, PartialEq, Eq)]
enum RankBy {
    /// Longest runtime first.
    Runtime,
    /// Lowest peak battery current first.
    Peak,
    /// Lightest first (the parts that give a `mass`).
    Mass,
    /// Cheapest first (the parts that give a `cost`).
    Cost,
}

/// Shown under `--help` of `sweep`.
const SWEEP_HELP: &str = "\
Output:
  the table and --format json hold every row and order them (passing first,
  then --rank); --format csv and json-lines stream each row as it is checked,
  in combination order, keeping only the best in memory.

Exit codes:
  0    at least one combination passes
  1    no combination passes (or --write-best found none to write)
  2    the plan or a --vary argument could not be read, too many combinations,
       or a file could not be written
  130  interrupted (Ctrl-C): the rows checked so far are written first";

/// What `railcheck sweep` was asked for besides the plan.
struct SweepOptions {
    vary: Vec<String>,
    rank: Option<RankBy>,
    only_passing: bool,
    strict: bool,
    max: usize,
    jobs: Option<usize>,
    write_best: Option<PathBuf>,
    quiet: bool,
}

#[derive(Clone, Copy, ValueEnum, PartialEq, Eq)]
enum NotesFormat {
    /// One self-contained HTML file.
    Html,
    /// Markdown, with the diagram as an SVG file beside it.
    Markdown,
}

#[derive(Clone, Copy, ValueEnum, PartialEq, Eq)]
enum NotesPaper {
    /// ISO A4.
    A4,
    /// US Letter.
    Letter,
}

const EXIT_FINDINGS: u8 = 1;
const EXIT_INPUT: u8 = 2;
/// A sweep stopped by Ctrl-C (128 + SIGINT, the shells' convention).
const EXIT_INTERRUPTED: u8 = 130;

/// The plan path that means standard input, and its name in reports.
const STDIN_PATH: &str = "-";
const STDIN_NAME: &str = "<stdin>";

/// How the terminal report is drawn, and what else the run was asked for.
struct Run {
    color: ColorWhen,
}

fn main() -> ExitCode {
    let cli = match Cli::try_parse() {
        Ok(cli) => cli,
        Err(error) => return usage_error(error),
    };
    let run = Run { color: cli.color };
    match cli.command {
        Command::Check {
            plan,
            strict,
            quiet,
            diagram,
        } => check(&run, &plan, strict, quiet, diagram.as_deref()),
        Command::Draw {
            plan,
            output,
            png,
            pdf,
            page,
            landscape,
        } => {
            let targets = DrawTargets {
                output: output.as_deref(),
                png: png.as_deref(),
                pdf: pdf.as_deref(),
                page: page.map(|p| railcheck::diagram::Page {
                    paper: p.paper(),
                    landscape,
                }),
            };
            draw(&run, &plan, &targets)
        }
        Command::Budget { plan, quiet } => budget(&run, &plan, quiet),
        Command::Wires { plan } => wires(&run, &plan),
        Command::Scenarios { plan } => scenarios(&run, &plan),
        Command::Bringup { plan } => bringup(&run, &plan),
        Command::Notes {
            file,
            output,
            format,
            page,
            parts,
        } => notes(&run, file, &output, format, page, parts),
        Command::Sweep {
            plan,
            vary,
            rank,
            only_passing,
            strict,
            max,
            jobs,
            write_best,
            quiet,
        } => sweep(
            &run,
            &plan,
            SweepOptions {
                vary,
                rank,
                only_passing,
                strict,
                max,
                jobs,
                write_best,
                quiet,
            },
        ),
        Command::Rules { id } => rules(id.as_deref()),
        Command::Schema => {
            emit(&report::plan_schema_text());
            ExitCode::SUCCESS
        }
        Command::Parts { id, parts } => show_parts(id.as_deref(), parts.as_deref()),
        Command::Init { battery, output } => init(&battery, output.as_deref()),
        Command::Completions { shell } => {
            let mut out = Vec::new();
            clap_complete::generate(shell, &mut Cli::command(), "railcheck", &mut out);
            emit_bytes(&out);
            ExitCode::SUCCESS
        }
        Command::Man => {
            let mut out = Vec::new();
            match clap_mangen::Man::new(Cli::command()).render(&mut out) {
                Ok(()) => {
                    emit_bytes(&out);
                    ExitCode::SUCCESS
                }
                Err(e) => fail(&format!("cannot write the manual page: {e}")),
            }
        }
    }
}

/// A command line clap refused. Under `--format json` or `sarif` the one
/// document of that format is printed too, so a caller parsing standard
/// output always gets one.
fn usage_error(error: clap::Error) -> ExitCode {
    if error.use_stderr() {
        let args: Vec<String> = std::env::args_os()
            .map(|a| a.to_string_lossy().into_owned())
            .collect();
        let format = args
            .iter()
            .enumerate()
            .find_map(|(i, arg)| match arg.as_str() {
                "--format" => args.get(i + 1).map(String::as_str),
                _ => arg.strip_prefix("--format="),
            });
        let rendered = error.render().to_string();
        // The first paragraph, without clap's `error:` and usage lines.
        let paragraph = rendered
            .lines()
            .take_while(|line| !line.trim().is_empty())
            .collect::<Vec<_>>()
            .join(" ");
        let message = paragraph
            .split_whitespace()
            .collect::<Vec<_>>()
            .join(" ")
            .trim_start_matches("error: ")
            .to_string();
        let message = message.as_str();
        const NAME: &str = "<command line>";
        match format {
            Some("json") => emit(&report::unplaced_input_error_json(NAME, message)),
            Some("sarif") => emit(&report::unplaced_input_error_sarif(
                NAME,
                railcheck::rules::RULES,
                message,
            )),
            _ => {}
        }
    }
    error.exit()
}

fn fail(message: &str) -> ExitCode {
    eprintln!("railcheck: {}", syntax::visible(message));
    ExitCode::from(EXIT_INPUT)
}

/// Like `fail`, and under a machine-readable format also prints the one
/// document that format promises, as an input error with no position.
fn fail_as(args: &PlanArgs, message: &str) -> ExitCode {
    let file = plan_name(&args.file);
    match args.format {
        Format::Json | Format::JsonLines => {
            emit(&report::unplaced_input_error_json(&file, message))
        }
        Format::Sarif => emit(&report::unplaced_input_error_sarif(
            &file,
            railcheck::rules::RULES,
            message,
        )),
        Format::Human | Format::Csv | Format::Markdown => {}
    }
    fail(message)
}

/// A plain-text report as a terminal may show it (`syntax::visible`): names
/// from a plan or part file cannot send control codes.
fn shown(text: String) -> String {
    syntax::visible(&text).into_owned()
}

fn emit(text: &str) {
    emit_bytes(text.as_bytes());
}

fn emit_bytes(bytes: &[u8]) {
    let mut stdout = std::io::stdout().lock();
    // A closed pipe (`railcheck check x | head`) is not an error worth a panic.
    let _ = stdout.write_all(bytes);
    let _ = stdout.flush();
}

/// Which stream a report goes to: colour and width are decided per stream.
#[derive(Clone, Copy, PartialEq, Eq)]
enum Stream {
    Stdout,
    Stderr,
}

/// Terminal widths outside this range make the report hard to read.
const NARROWEST: usize = 60;
const WIDEST: usize = 160;
/// Width when the stream is not a terminal: fixed, so piped output and
/// snapshots do not depend on the window the command ran in.
const PIPE_WIDTH: usize = 100;

fn style(run: &Run, stream: Stream) -> HumanStyle {
    // anstream applies the conventions (NO_COLOR non-empty, CLICOLOR,
    // CLICOLOR_FORCE, a terminal or not); TERM=dumb is refused on top, as
    // such a terminal shows escape codes as text.
    let auto = |choice: anstream::ColorChoice| {
        choice != anstream::ColorChoice::Never
            && std::env::var_os("TERM").is_none_or(|term| term != "dumb")
    };
    let (color, terminal) = match stream {
        Stream::Stdout => {
            let out = std::io::stdout();
            let width = out
                .is_terminal()
                .then(|| terminal_size::terminal_size_of(&out))
                .flatten();
            (auto(anstream::AutoStream::choice(&out)), width)
        }
        Stream::Stderr => {
            let err = std::io::stderr();
            let width = err
                .is_terminal()
                .then(|| terminal_size::terminal_size_of(&err))
                .flatten();
            (auto(anstream::AutoStream::choice(&err)), width)
        }
    };
    HumanStyle {
        color: match run.color {
            ColorWhen::Always => true,
            ColorWhen::Never => false,
            ColorWhen::Auto => color,
        },
        width: terminal.map_or(PIPE_WIDTH, |(terminal_size::Width(w), _)| {
            usize::from(w).clamp(NARROWEST, WIDEST)
        }),
    }
}

fn is_stdin(path: &Path) -> bool {
    path.as_os_str() == STDIN_PATH
}

/// The name a plan goes by in reports.
fn plan_name(path: &Path) -> String {
    if is_stdin(path) {
        STDIN_NAME.to_string()
    } else {
        path.display().to_string()
    }
}

/// Reads and checks the plan; on input errors prints them (to `stream`) and
/// returns the exit code to end with.
///
/// The checked plan is never freed: each command ends the process once it
/// has written its output, and the system takes the whole heap back at
/// once, where freeing a large plan's parts, nets and points one by one
/// costs a few per cent of the run.
fn load(
    run: &Run,
    args: &PlanArgs,
    stream: Stream,
) -> Result<ManuallyDrop<railcheck::Checked>, ExitCode> {
    load_with_library(run, args, stream).map(|(checked, _)| ManuallyDrop::new(checked))
}

/// `load`, also handing back the library the plan was read with.
fn load_with_library(
    run: &Run,
    args: &PlanArgs,
    stream: Stream,
) -> Result<(railcheck::Checked, Library), ExitCode> {
    let bytes = read_bounded(&args.file).map_err(|message| fail_as(args, &message))?;
    let name = plan_name(&args.file);
    let text = railcheck::decode(&name, bytes)
        .map_err(|failure| report_input(run, args, &failure, stream))?;
    let library = library(args.parts.as_deref()).map_err(|message| fail_as(args, &message))?;
    // Held once, by the sources, for the whole run.
    let text: std::sync::Arc<str> = text.into();
    let checked = railcheck::check_shared(&name, text, &library)
        .map_err(|failure| report_input(run, args, &failure, stream))?;
    Ok((checked, library))
}

/// The built-in parts plus a user folder, if given.
fn library(parts: Option<&Path>) -> Result<Library, String> {
    let mut library = Library::builtin();
    if let Some(dir) = parts {
        add_user_parts(&mut library, dir)?;
    }
    Ok(library)
}

/// Prints input problems in the chosen format; the run ends with exit code 2.
fn report_input(
    run: &Run,
    args: &PlanArgs,
    failure: &railcheck::InputFailure,
    stream: Stream,
) -> ExitCode {
    let out = match args.format {
        Format::Json | Format::JsonLines => {
            report::input_errors_json(&failure.sources, failure.plan_source, &failure.errors)
        }
        Format::Sarif => {
            report::input_errors_sarif(&failure.sources, railcheck::rules::RULES, &failure.errors)
        }
        Format::Human | Format::Csv | Format::Markdown => {
            report::render_input_errors(&failure.sources, &failure.errors, style(run, stream))
        }
    };
    match stream {
        Stream::Stdout => emit(&out),
        Stream::Stderr => eprint!("{out}"),
    }
    ExitCode::from(EXIT_INPUT)
}

fn check(
    run: &Run,
    args: &PlanArgs,
    strict: bool,
    quiet: bool,
    diagram: Option<&Path>,
) -> ExitCode {
    if diagram.is_some_and(is_stdin) {
        return fail_as(
            args,
            "`--diagram -` would mix the diagram into the report; use `railcheck draw FILE -o -`",
        );
    }
    refuse_format(args, "check", &[Format::Human, Format::Json, Format::Sarif]);
    let checked = match load(run, args, Stream::Stdout) {
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
        wrote(path, svg.len());
    }
    let cautions = railcheck::safety::cautions(&checked.plan);
    let out = match args.format {
        Format::Sarif => report::findings_sarif(
            &checked.sources,
            railcheck::rules::RULES,
            &checked.findings,
            &cautions,
        ),
        Format::Human if quiet => shown(report::quiet_findings(
            checked.sources.name(checked.plan_source),
            &checked.findings,
            &cautions,
        )),
        Format::Json => report::findings_json(
            &checked.sources,
            checked.plan_source,
            &checked.findings,
            &cautions,
        ),
        Format::Human | Format::Csv | Format::Markdown | Format::JsonLines => {
            report::render_findings(
                &checked.sources,
                checked.plan_source,
                &checked.findings,
                &cautions,
                style(run, Stream::Stdout),
            )
        }
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

fn draw(run: &Run, args: &PlanArgs, targets: &DrawTargets) -> ExitCode {
    refuse_format(args, "draw", &[Format::Human, Format::Json, Format::Sarif]);
    let outputs = [targets.output, targets.png, targets.pdf];
    let to_stdout = outputs.iter().filter(|o| o.is_some_and(is_stdin)).count();
    if to_stdout > 1 {
        return fail_as(
            args,
            "only one of `-o`, `--png` and `--pdf` can be `-` (standard output)",
        );
    }
    // With the diagram on standard output, problems go to standard error so
    // the output stays a clean document.
    let stream = if to_stdout > 0 {
        Stream::Stderr
    } else {
        Stream::Stdout
    };
    let checked = match load(run, args, stream) {
        Ok(c) => c,
        Err(code) => return code,
    };
    // On paper when a page is asked for, and always for a PDF.
    let sheets = if targets.page.is_some() || targets.pdf.is_some() {
        match railcheck::diagram::draw_pages(&checked, targets.page) {
            Ok(sheets) => Some(sheets),
            Err(e) => return fail_as(args, &e.to_string()),
        }
    } else {
        None
    };
    // One SVG (and PNG) per sheet: OUT.svg for one, OUT-1.svg, OUT-2.svg, …
    // for several.
    let svgs = match (&sheets, targets.page) {
        (Some(sheets), Some(_)) => sheets.svgs.clone(),
        _ => vec![railcheck::diagram::draw(&checked)],
    };
    let mut names = Vec::new();
    for path in [targets.output, targets.png].into_iter().flatten() {
        if svgs.len() > 1 && is_stdin(path) {
            return fail_as(
                args,
                &format!(
                    "the diagram takes {} sheets on {}, one document each, and standard output takes one: name a file (the sheets go to OUT-1.svg, OUT-2.svg, …) or write `--pdf -`",
                    svgs.len(),
                    targets.page.map(|p| p.to_string()).unwrap_or_default()
                ),
            );
        }
        names.push(sheet_names(path, svgs.len()));
    }
    // Every name is checked before any file is written, so a set of sheets
    // is never left half-written because one name is refused.
    for name in names.iter().flatten() {
        if let Err(message) = output_allowed(name, &args.file) {
            return fail_as(args, &message);
        }
    }
    if let Some(path) = targets.output {
        for (name, svg) in sheet_names(path, svgs.len()).iter().zip(&svgs) {
            if let Err(message) = deliver(name, &args.file, svg.as_bytes()) {
                return fail_as(args, &message);
            }
        }
        left_over_sheets(path, svgs.len());
    }
    let mut options = resvg::usvg::Options::default();
    if targets.png.is_some() || targets.pdf.is_some() {
        options.fontdb_mut().load_system_fonts();
    }
    if let Some(path) = targets.png {
        for (name, svg) in sheet_names(path, svgs.len()).iter().zip(&svgs) {
            let written = railcheck::diagram::png(svg, &options)
                .map_err(|e| e.to_string())
                .and_then(|bytes| deliver(name, &args.file, &bytes));
            if let Err(message) = written {
                return fail_as(args, &message);
            }
        }
        left_over_sheets(path, svgs.len());
    }
    if let (Some(path), Some(sheets)) = (targets.pdf, &sheets) {
        let written = railcheck::diagram::pdf(&sheets.svgs, &options)
            .map_err(|e| e.to_string())
            .and_then(|bytes| deliver(path, &args.file, &bytes));
        if let Err(message) = written {
            return fail_as(args, &message);
        }
    }
    if let Some(sheets) = &sheets {
        eprintln!(
            "{} sheet{} on {}",
            sheets.svgs.len(),
            if sheets.svgs.len() == 1 { "" } else { "s" },
            sheets.page
        );
    }
    ExitCode::SUCCESS
}

/// Ends the run with a usage error when `format` is not one `command` writes.
fn refuse_format(args: &PlanArgs, command: &str, allowed: &[Format]) {
    if allowed.contains(&args.format) {
        return;
    }
    let name = |f: &Format| match f {
        Format::Human => "`human`",
        Format::Json => "`json`",
        Format::Sarif => "`sarif`",
        Format::Csv => "`csv`",
        Format::Markdown => "`markdown`",
        Format::JsonLines => "`json-lines`",
    };
    let why = match args.format {
        Format::Sarif => " (SARIF carries findings)",
        Format::Csv => " (CSV is the rows of the wire list or a sweep)",
        Format::Markdown => " (Markdown is the bring-up checklist)",
        Format::JsonLines => " (JSON lines stream the rows of a sweep)",
        _ => "",
    };
    let choices: Vec<&str> = allowed.iter().map(name).collect();
    Cli::command()
        .error(
            clap::error::ErrorKind::InvalidValue,
            format!(
                "`{command}` has no {} form{why}: use `--format` {}",
                name(&args.format).trim_matches('`').to_uppercase(),
                choices.join(" or ")
            ),
        )
        .exit();
}

/// Where input problems go: to standard error when the output is a
/// document in `document` format (CSV, a Markdown checklist) that they would
/// break, else to standard output with the report.
fn problems_beside(args: &PlanArgs, document: Format) -> Stream {
    if args.format == document {
        Stream::Stderr
    } else {
        Stream::Stdout
    }
}

fn bringup(run: &Run, args: &PlanArgs) -> ExitCode {
    refuse_format(
        args,
        "bringup",
        &[Format::Human, Format::Markdown, Format::Json],
    );
    let stream = problems_beside(args, Format::Markdown);
    let checked = match load(run, args, stream) {
        Ok(c) => c,
        Err(code) => return code,
    };
    let procedure = railcheck::bringup::procedure(&checked);
    let name = checked.sources.name(checked.plan_source);
    emit(&match args.format {
        Format::Json => report::bringup_json(name, &procedure),
        Format::Markdown => report::bringup_markdown(name, &procedure),
        _ => shown(report::bringup_text(name, &procedure)),
    });
    if procedure.solved {
        ExitCode::SUCCESS
    } else {
        ExitCode::from(EXIT_FINDINGS)
    }
}

fn wires(run: &Run, args: &PlanArgs) -> ExitCode {
    refuse_format(args, "wires", &[Format::Human, Format::Csv, Format::Json]);
    let stream = problems_beside(args, Format::Csv);
    let checked = match load(run, args, stream) {
        Ok(c) => c,
        Err(code) => return code,
    };
    let list = railcheck::wirelist::wire_list(&checked);
    let name = checked.sources.name(checked.plan_source);
    emit(&match args.format {
        Format::Json => report::wires_json(name, &list),
        Format::Csv => report::wires_csv(&list),
        _ => shown(report::wires_table(name, &list)),
    });
    ExitCode::SUCCESS
}

fn scenarios(run: &Run, args: &PlanArgs) -> ExitCode {
    refuse_format(args, "scenarios", &[Format::Human, Format::Json]);
    // Under `--format json` the input errors are the document itself.
    let checked = match load(run, args, Stream::Stdout) {
        Ok(c) => c,
        Err(code) => return code,
    };
    let name = checked.sources.name(checked.plan_source);
    emit(&match args.format {
        Format::Json => report::scenarios_json(name, &checked),
        _ => shown(report::scenarios_table(name, &checked)),
    });
    ExitCode::SUCCESS
}

fn notes(
    run: &Run,
    file: PathBuf,
    output: &Path,
    format: NotesFormat,
    page: NotesPaper,
    parts: Option<PathBuf>,
) -> ExitCode {
    let args = PlanArgs {
        file,
        format: Format::Human,
        parts,
    };
    let to_stdout = is_stdin(output);
    if to_stdout && format == NotesFormat::Markdown {
        return fail_as(
            &args,
            "Markdown notes come with their diagram as a file beside them: give `-o notes.md`",
        );
    }
    let stream = if to_stdout {
        Stream::Stderr
    } else {
        Stream::Stdout
    };
    let checked = match load(run, &args, stream) {
        Ok(c) => c,
        Err(code) => return code,
    };
    let result = match format {
        NotesFormat::Html => {
            let page = match page {
                NotesPaper::A4 => report::NotesPage::A4,
                NotesPaper::Letter => report::NotesPage::Letter,
            };
            deliver(
                output,
                &args.file,
                report::notes_html(&checked, page).as_bytes(),
            )
        }
        NotesFormat::Markdown => {
            let svg_path = output.with_extension("svg");
            if svg_path == output {
                return fail_as(
                    &args,
                    "the Markdown notes and their diagram would share one name: give `-o notes.md`",
                );
            }
            let svg_name = svg_path
                .file_name()
                .map(|n| n.to_string_lossy().into_owned())
                .unwrap_or_default();
            let svg = railcheck::diagram::draw(&checked);
            deliver(&svg_path, &args.file, svg.as_bytes()).and_then(|()| {
                deliver(
                    output,
                    &args.file,
                    report::notes_markdown(&checked, &svg_name).as_bytes(),
                )
            })
        }
    };
    match result {
        Ok(()) => ExitCode::SUCCESS,
        Err(message) => fail_as(&args, &message),
    }
}

fn budget(run: &Run, args: &PlanArgs, quiet: bool) -> ExitCode {
    refuse_format(args, "budget", &[Format::Human, Format::Json]);
    let checked = match load(run, args, Stream::Stdout) {
        Ok(c) => c,
        Err(code) => return code,
    };
    let budget = railcheck::budget::budget(&checked);
    let name = checked.sources.name(checked.plan_source);
    emit(&match args.format {
        Format::Human if quiet => shown(report::quiet_budget(name, &budget)),
        Format::Json => report::budget_json(name, &budget),
        _ => shown(report::budget_table(name, &budget)),
    });
    // A plan whose operating point could not be solved has no budget.
    if budget.solved {
        ExitCode::SUCCESS
    } else {
        ExitCode::from(EXIT_FINDINGS)
    }
}

fn init(battery: &str, output: Option<&Path>) -> ExitCode {
    let plan = match railcheck::starter::starter(&Library::builtin(), battery) {
        Ok(plan) => plan,
        Err(e) => return fail(&e.message),
    };
    match output {
        None => emit(&plan),
        Some(path) if is_stdin(path) => emit(&plan),
        Some(path) => {
            // Said early, so no temporary file is made for nothing.
            if path.symlink_metadata().is_ok() {
                return fail(&refuse_existing(path));
            }
            if let Err(message) = write_atomically(path, plan.as_bytes(), Replace::Refused) {
                return fail(&message);
            }
            wrote(path, plan.len());
        }
    }
    ExitCode::SUCCESS
}

fn show_parts(id: Option<&str>, parts: Option<&Path>) -> ExitCode {
    let library = match library(parts) {
        Ok(library) => library,
        Err(message) => return fail(&message),
    };
    match id {
        None => emit(&shown(report::parts_list(&library))),
        Some(id) => match report::part_sheet(&library, id) {
            Ok(sheet) => emit(&shown(sheet)),
            Err(unknown) => return fail(&unknown.message),
        },
    }
    ExitCode::SUCCESS
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

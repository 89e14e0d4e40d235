//! `railcheck sweep` on the command line: its rows written as they finish
//! or all at once, a progress bar on a terminal, and Ctrl-C stopping it
//! with the rows checked so far. The sweep itself is `railcheck::sweep`.

use crate::cli::files::{is_same_file, write_output, wrote};
use crate::{
    EXIT_FINDINGS, EXIT_INTERRUPTED, Format, PlanArgs, RankBy, Run, Stream, SweepOptions, emit,
    fail, fail_as, is_stdin, load_with_library, problems_beside, refuse_format, report_input,
    shown,
};
use railcheck::report;
use railcheck::syntax;
use std::process::ExitCode;

pub(crate) fn sweep(run: &Run, args: &PlanArgs, options: SweepOptions) -> ExitCode {
    use railcheck::sweep::{Rank, Summary, Sweep, SweepError, order};
    refuse_format(
        args,
        "sweep",
        &[Format::Human, Format::Json, Format::Csv, Format::JsonLines],
    );
    if let Some(path) = &options.write_best {
        if is_stdin(path) {
            return fail_as(
                args,
                "`--write-best -` would mix the plan into the table: give a file name",
            );
        }
        if is_same_file(path, &args.file) {
            return fail_as(
                args,
                &format!(
                    "refusing to write the best combination over the plan {}",
                    args.file.display()
                ),
            );
        }
    }
    // Streamed formats keep standard output for their rows.
    let stream = if args.format == Format::JsonLines {
        Stream::Stderr
    } else {
        problems_beside(args, Format::Csv)
    };
    let (checked, library) = match load_with_library(run, args, stream) {
        Ok(loaded) => loaded,
        Err(code) => return code,
    };
    let too_many = |counted: Option<usize>| {
        let count = counted.map_or("more than 2^64".to_string(), |n| n.to_string());
        format!(
            "{count} combinations are more than the {} a sweep checks; \
             vary fewer values, or allow them with `--max N`",
            options.max
        )
    };
    let sweep = match Sweep::new(&checked, &library, &options.vary, options.max) {
        Ok(sweep) => sweep,
        Err(SweepError::Usage(message)) => return fail_as(args, &message),
        Err(SweepError::TooMany(counted)) => return fail_as(args, &too_many(counted)),
        Err(SweepError::Input(errors)) => {
            let failure = railcheck::InputFailure {
                sources: checked.sources.clone(),
                plan_source: checked.plan_source,
                errors,
            };
            return report_input(run, args, &failure, stream);
        }
    };
    if sweep.axes.is_empty() {
        return fail_as(
            args,
            "nothing to vary: give `--vary KEY=V1,V2,…` or a `sweep:` section in the plan",
        );
    }
    let total = match sweep.combinations() {
        Some(n) if n <= options.max => n,
        counted => return fail_as(args, &too_many(counted)),
    };
    let threads = options
        .jobs
        .unwrap_or_else(|| std::thread::available_parallelism().map_or(1, |n| n.get()))
        .clamp(1, total.max(1));
    if !options.quiet {
        eprintln!(
            "railcheck: checking {total} combination{} on {threads} thread{}",
            if total == 1 { "" } else { "s" },
            if threads == 1 { "" } else { "s" }
        );
    }
    let rank = options.rank.map(|r| match r {
        RankBy::Runtime => Rank::Runtime,
        RankBy::Peak => Rank::Peak,
        RankBy::Mass => Rank::Mass,
        RankBy::Cost => Rank::Cost,
    });
    let stop = interrupt_flag();
    let progress = SweepProgress::new(total, options.quiet);
    let mut summary = Summary::new(rank, options.strict);
    let name = checked.sources.name(checked.plan_source).to_string();
    let streamed = matches!(args.format, Format::Csv | Format::JsonLines);
    let mut rows = Vec::new();
    // Streamed, each row is written as soon as the rows before it are:
    // nothing but the summary is kept. Otherwise the rows are kept to be
    // ordered.
    if streamed {
        emit(&match args.format {
            Format::Csv => report::sweep_csv_header(&sweep.axes),
            _ => report::sweep_jsonl_start(&name, &sweep.axes, total, options.strict),
        });
    }
    sweep.run_streaming(
        &library,
        threads,
        stop,
        |row| {
            summary.add(&row);
            if !streamed {
                rows.push(row);
            } else if !options.only_passing || row.passes(options.strict) {
                emit(&match args.format {
                    Format::Csv => report::sweep_csv_record(&row, options.strict),
                    _ => report::sweep_jsonl_row(&row, options.strict),
                });
            }
        },
        |done| progress.tick(done),
    );
    progress.finish();
    let interrupted = summary.checked < total;
    let best = summary.best_passing().map(|r| r.index);
    // The best plan is written before the table, so that a failure to write
    // it is the one document a machine-readable format prints (streamed
    // rows are out already: then the failure is said on standard error).
    if !interrupted
        && let Some(path) = &options.write_best
        && let Some(index) = best
    {
        let text = sweep.variant(index);
        if let Err(message) = write_output(path, &args.file, text.as_bytes()) {
            // Streamed rows are already out: the message goes beside them.
            return if streamed {
                fail(&message)
            } else {
                fail_as(args, &message)
            };
        }
        wrote(path, text.len());
    }
    if streamed {
        if args.format == Format::JsonLines {
            emit(&report::sweep_jsonl_end(&summary, total));
        }
    } else {
        order(&mut rows, rank, options.strict);
        if options.only_passing {
            rows.retain(|r| r.passes(options.strict));
        }
        let counts = (summary.checked, total);
        emit(&match args.format {
            Format::Json => report::sweep_json(&name, &sweep.axes, &rows, counts, options.strict),
            _ => shown(report::sweep_table(
                &name,
                &sweep.axes,
                &rows,
                counts,
                options.strict,
            )),
        });
    }
    if interrupted {
        eprintln!(
            "railcheck: interrupted: {} of {total} combinations were checked{}",
            summary.checked,
            if options.write_best.is_some() {
                "; no best plan was written"
            } else {
                ""
            }
        );
        return ExitCode::from(EXIT_INTERRUPTED);
    }
    match (best, &options.write_best) {
        (Some(_), _) => ExitCode::SUCCESS,
        (None, Some(path)) => {
            eprintln!(
                "railcheck: no combination passes; {} was not written",
                syntax::visible(&path.display().to_string())
            );
            ExitCode::from(EXIT_FINDINGS)
        }
        (None, None) => ExitCode::from(EXIT_FINDINGS),
    }
}

/// Set by Ctrl-C: a sweep stops taking new combinations and writes what it
/// has. A second Ctrl-C ends the program at once.
pub(crate) fn interrupt_flag() -> &'static std::sync::atomic::AtomicBool {
    use std::sync::atomic::{AtomicBool, Ordering};
    static STOP: AtomicBool = AtomicBool::new(false);
    // Without a handler (one already set, or no signals here) Ctrl-C simply
    // ends the program, as it would anyway.
    let _ = ctrlc::set_handler(|| {
        if STOP.swap(true, Ordering::SeqCst) {
            std::process::exit(i32::from(EXIT_INTERRUPTED));
        }
    });
    &STOP
}

/// The progress bar of a sweep: drawn on standard error only when it is a
/// terminal, the sweep has run for more than a second and `--quiet` is not
/// given.
pub(crate) struct SweepProgress {
    bar: indicatif::ProgressBar,
    started: std::time::Instant,
    shown: std::cell::Cell<bool>,
    allowed: bool,
}

impl SweepProgress {
    fn new(total: usize, quiet: bool) -> SweepProgress {
        use std::io::IsTerminal;
        let bar = indicatif::ProgressBar::with_draw_target(
            Some(total as u64),
            indicatif::ProgressDrawTarget::hidden(),
        );
        if let Ok(style) = indicatif::ProgressStyle::with_template(
            "{bar:30} {pos}/{len} combinations, {elapsed} so far, about {eta} left",
        ) {
            bar.set_style(style);
        }
        SweepProgress {
            bar,
            started: std::time::Instant::now(),
            shown: std::cell::Cell::new(false),
            allowed: !quiet && std::io::stderr().is_terminal(),
        }
    }

    fn tick(&self, done: usize) {
        self.bar.set_position(done as u64);
        if self.allowed
            && !self.shown.get()
            && self.started.elapsed() > std::time::Duration::from_secs(1)
        {
            self.shown.set(true);
            self.bar
                .set_draw_target(indicatif::ProgressDrawTarget::stderr());
        }
    }

    fn finish(&self) {
        self.bar.finish_and_clear();
    }
}

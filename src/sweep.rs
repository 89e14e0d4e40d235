//! Design sweeps: every combination of a few design choices (a pack, a
//! regulator's rating, a wire size, a limit, a mode's length), each checked
//! as a whole plan.
//!
//! Each combination is the plan's own text with the chosen values written in
//! (the rest of the file, comments and layout kept), checked by the ordinary
//! [`crate::check`]: a row is exactly what `railcheck check` says of that
//! variant. Values are therefore read and judged like any value of a plan,
//! with the same messages and hints.
//!
//! Not for: printing the table (that is `report::sweep_*`).

mod tree;

use crate::budget::budget;
use crate::model::{InputError, Library, format};
use crate::rules::{Margin, Severity};
use crate::spelling::closest;
use crate::syntax::{self, Node, NodeKind, SourceId, Span};
use crate::{Checked, InputFailure};
use std::sync::atomic::{AtomicBool, AtomicUsize, Ordering};
use uom::si::f64::{ElectricCurrent, Mass, Time};

/// The most combinations a sweep checks unless told otherwise (`--max`): at
/// a few tens of milliseconds per check, about ten minutes on one core.
pub const MAX_COMBINATIONS: usize = 10_000;

/// What one axis of a sweep changes in the plan.
#[derive(Clone, Debug, PartialEq, Eq)]
pub enum Target {
    /// A library part's id: its `use:`.
    PartId {
        /// The part's name.
        part: String,
    },
    /// One field of a part: under `with:` for a library part, in its own
    /// mapping for an inline one.
    PartField {
        /// The part's name.
        part: String,
        /// The class field (`current`, `capacity`).
        field: String,
        /// Whether the part comes from the library (`use:`).
        library: bool,
    },
    /// A net's `wire`, `length` or another of its fields.
    NetField {
        /// The net's name.
        net: String,
        /// The field (`wire`, `length`).
        field: String,
    },
    /// The same field of several nets at once (`VMOT+GND_MOT.wire`): each
    /// net gets the value.
    NetsField {
        /// The nets' names, in the order written.
        nets: Vec<String>,
        /// The field (`wire`, `length`).
        field: String,
    },
    /// A project-wide limit (`limits.wire_drop`).
    Limit {
        /// The limit's key.
        field: String,
    },
    /// How long a mode lasts (`modes.climb.lasts`).
    ModeLasts {
        /// The mode's name.
        mode: String,
    },
}

impl Target {
    /// The keys leading to the value in the plan's YAML tree.
    fn path(&self) -> Vec<&str> {
        match self {
            Target::PartId { part } => vec!["parts", part, "use"],
            Target::PartField {
                part,
                field,
                library: true,
            } => vec!["parts", part, "with", field],
            Target::PartField { part, field, .. } => vec!["parts", part, field],
            Target::NetField { net, field } => vec!["nets", net, field],
            // Expanded into one `NetField` per net before any edit (`each`).
            Target::NetsField { field, .. } => vec!["nets", field],
            Target::Limit { field } => vec!["limits", field],
            Target::ModeLasts { mode } => vec!["modes", mode, "lasts"],
        }
    }
}

impl Target {
    /// The single targets this one edits: a `NetsField` is one `NetField`
    /// per net.
    fn each(&self) -> Vec<Target> {
        match self {
            Target::NetsField { nets, field } => nets
                .iter()
                .map(|net| Target::NetField {
                    net: net.clone(),
                    field: field.clone(),
                })
                .collect(),
            other => vec![other.clone()],
        }
    }
}

/// Splits `VMOT+GND_MOT` into net names, trying longer names first so a
/// net whose own name has a `+` (`BATT+`) is found whole. `None` when no
/// split names only nets of the plan.
fn split_nets(key: &str, nets: &[String]) -> Option<Vec<String>> {
    let pieces: Vec<&str> = key.split('+').collect();
    fn from(at: usize, pieces: &[&str], nets: &[String]) -> Option<Vec<String>> {
        if at == pieces.len() {
            return Some(Vec::new());
        }
        for end in (at + 1..=pieces.len()).rev() {
            let name = pieces[at..end].join("+");
            if nets.contains(&name)
                && let Some(mut rest) = from(end, pieces, nets)
            {
                rest.insert(0, name);
                return Some(rest);
            }
        }
        None
    }
    from(0, &pieces, nets)
}

/// One design choice and the values it takes.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct Axis {
    /// The key as written (`pack`, `VMOT.wire`, `modes.climb.lasts`).
    pub key: String,
    /// What it changes.
    pub target: Target,
    /// The values, as a plan writes them, in the order given.
    pub values: Vec<String>,
}

/// Why a sweep could not start.
#[derive(Debug)]
pub enum SweepError {
    /// A `--vary` argument is wrong: the message names it, with a hint.
    Usage(String),
    /// The plan's `sweep:` section is wrong: each problem at its place.
    Input(Vec<InputError>),
    /// The axes make more combinations than allowed (`None`: more than
    /// a `usize` counts). Said before any value is read.
    TooMany(Option<usize>),
}

/// A sweep ready to run: the plan's text and tree, and its axes.
#[derive(Debug)]
pub struct Sweep {
    file_name: String,
    text: String,
    root: Node,
    /// Each part's class, by name, as the plan reads.
    classes: Vec<(String, &'static str)>,
    /// Where the plan's sections and entries are, so a variant re-parses
    /// only the entries it changes (`None`: parse every variant whole).
    layout: Option<tree::Layout>,
    /// The axes: the plan's `sweep:` section first, then each `--vary`
    /// (a `--vary` of a key the section also names replaces it).
    pub axes: Vec<Axis>,
}

/// What checking one combination found.
#[derive(Clone, Debug, PartialEq)]
pub struct Row {
    /// The combination's place in the odometer order of the axes (the last
    /// axis changes fastest), from 0.
    pub index: usize,
    /// The value of each axis, in axis order.
    pub values: Vec<String>,
    /// The verdict.
    pub outcome: Outcome,
}

/// The verdict on one combination.
#[derive(Clone, Debug, PartialEq)]
pub enum Outcome {
    /// The variant read and was checked.
    Checked(Box<Verdict>),
    /// The variant could not be read (values that do not go together, such
    /// as a field the chosen part's class does not have): the first problem.
    Unreadable(String),
}

/// The findings and figures of one checked combination.
#[derive(Clone, Debug, PartialEq)]
pub struct Verdict {
    /// How many errors.
    pub errors: usize,
    /// How many warnings.
    pub warnings: usize,
    /// How many notes.
    pub notes: usize,
    /// The first error, as the report sorts them: its rule id and message.
    pub first_error: Option<(String, String)>,
    /// The shortest runtime of any battery from the plan's profile; `None`
    /// without a solved operating point or a capacity.
    pub runtime: Option<Time>,
    /// The highest peak current out of any battery.
    pub peak_current: Option<ElectricCurrent>,
    /// The tightest margin: of every comparison the rules made against a
    /// rating or limit (wire ampacity and drop, fuse, regulator, driver
    /// channel and battery currents, supply-pin voltages, logic levels), the
    /// one with the smallest share of its limit left, with where and when.
    /// Negative when a limit is passed.
    pub margin: Option<Margin>,
    /// The parts' masses added up, when any part gives one.
    pub mass: Option<Mass>,
    /// How many parts give no mass (the sum leaves them out).
    pub without_mass: usize,
    /// The parts' costs added up (in the plan's own currency), when any
    /// part gives one.
    pub cost: Option<f64>,
    /// How many parts give no cost.
    pub without_cost: usize,
}

impl Row {
    /// Whether the combination checks without errors (and, when `strict`,
    /// without warnings).
    pub fn passes(&self, strict: bool) -> bool {
        match &self.outcome {
            Outcome::Checked(v) => v.errors == 0 && (!strict || v.warnings == 0),
            Outcome::Unreadable(_) => false,
        }
    }

    /// The verdict, when the variant read.
    pub fn verdict(&self) -> Option<&Verdict> {
        match &self.outcome {
            Outcome::Checked(v) => Some(v),
            Outcome::Unreadable(_) => None,
        }
    }
}

/// How rows are ordered after the passing-first split.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Rank {
    /// Longest runtime first.
    Runtime,
    /// Lowest peak battery current first.
    Peak,
    /// Lightest first (the parts that give a mass).
    Mass,
    /// Cheapest first (the parts that give a cost).
    Cost,
}

/// How a row sorts: passing first; then by `rank` when given (a missing
/// figure last), fewer warnings, combination order.
fn rank_key(r: &Row, rank: Option<Rank>, strict: bool) -> (bool, f64, usize, usize) {
    let v = r.verdict();
    let ranked = match rank {
        // Higher is better: negate.
        Some(Rank::Runtime) => v
            .and_then(|v| v.runtime)
            .map_or(f64::INFINITY, |t| -t.value),
        Some(Rank::Peak) => v
            .and_then(|v| v.peak_current)
            .map_or(f64::INFINITY, |i| i.value),
        Some(Rank::Mass) => v.and_then(|v| v.mass).map_or(f64::INFINITY, |m| m.value),
        Some(Rank::Cost) => v.and_then(|v| v.cost).unwrap_or(f64::INFINITY),
        None => 0.0,
    };
    (
        !r.passes(strict),
        ranked,
        v.map_or(usize::MAX, |v| v.warnings),
        r.index,
    )
}

fn compare(a: &Row, b: &Row, rank: Option<Rank>, strict: bool) -> std::cmp::Ordering {
    let (ka, kb) = (rank_key(a, rank, strict), rank_key(b, rank, strict));
    ka.0.cmp(&kb.0)
        .then(ka.1.total_cmp(&kb.1))
        .then(ka.2.cmp(&kb.2))
        .then(ka.3.cmp(&kb.3))
}

/// Orders rows for the table: passing rows first; within each group by
/// `rank` when given, then fewer warnings, then combination order. The best
/// combination is the first row when it passes.
pub fn order(rows: &mut [Row], rank: Option<Rank>, strict: bool) {
    rows.sort_by(|a, b| compare(a, b, rank, strict));
}

/// What a streamed sweep keeps of its rows: how many were checked and
/// passed, and the best row by the same order as [`order`] — a few numbers,
/// whatever the number of combinations.
#[derive(Clone, Debug)]
pub struct Summary {
    /// How many rows were checked.
    pub checked: usize,
    /// How many of them pass.
    pub passing: usize,
    /// The first row in [`order`]'s order among those seen.
    pub best: Option<Row>,
    rank: Option<Rank>,
    strict: bool,
}

impl Summary {
    /// An empty summary ranking by `rank`.
    pub fn new(rank: Option<Rank>, strict: bool) -> Summary {
        Summary {
            checked: 0,
            passing: 0,
            best: None,
            rank,
            strict,
        }
    }

    /// Counts a row, keeping it when it is the best so far.
    pub fn add(&mut self, row: &Row) {
        self.checked += 1;
        if row.passes(self.strict) {
            self.passing += 1;
        }
        let better = self.best.as_ref().is_none_or(|best| {
            compare(row, best, self.rank, self.strict) == std::cmp::Ordering::Less
        });
        if better {
            self.best = Some(row.clone());
        }
    }

    /// The best row when it passes.
    pub fn best_passing(&self) -> Option<&Row> {
        self.best.as_ref().filter(|r| r.passes(self.strict))
    }
}

impl Sweep {
    /// Prepares a sweep of a plan that reads (`base` is its check): reads the
    /// plan's `sweep:` section and the `--vary` arguments (`KEY=V1,V2,…`),
    /// and reads every value once in a variant of its own, so a value the
    /// plan would refuse is refused here, naming its `--vary` argument or
    /// its place in the section. More than `max` combinations are refused
    /// before any value is read.
    ///
    /// ```
    /// use railcheck::model::Library;
    /// use railcheck::sweep::{Outcome, Sweep};
    ///
    /// // A greenhouse grow lamp taking 2.5 A from a 5 V buck: rated 2 A or 5 A?
    /// let plan = "\
    /// railcheck: 1
    /// parts:
    ///   pack: { use: battery/lipo-3s }
    ///   fuse: { use: fuse/blade-15a }
    ///   buck: { use: regulator/buck-5v-5a }
    ///   lamp:
    ///     class: load
    ///     pins:
    ///       vin: { role: supply-in, range: 4.5 V..5.5 V, draw: 2.5 A }
    ///       gnd: { role: ground }
    /// nets:
    ///   BATT+: [pack.pos, fuse.a]
    ///   VBUS: [fuse.b, buck.vin]
    ///   5V: [buck.vout, lamp.vin]
    ///   GND: [pack.neg, buck.gnd, lamp.gnd]
    /// ";
    /// let library = Library::builtin();
    /// let base = railcheck::check("lamp.yaml", plan, &library).unwrap();
    /// let vary = ["buck.current=2 A,5 A".to_string()];
    /// let sweep = Sweep::new(&base, &library, &vary, 100).unwrap();
    /// let rows = sweep.run(&library, 1);
    /// assert!(!rows[0].passes(false) && rows[1].passes(false));
    /// let margin = |i: usize| match &rows[i].outcome {
    ///     Outcome::Checked(v) => v.margin.clone().unwrap(),
    ///     Outcome::Unreadable(_) => unreachable!(),
    /// };
    /// // The tightest rating is the buck's output current at 2.5 A: what is
    /// // left of it is 2 A − 2.5 A = −0.5 A, −25 % of 2 A; and 5 A − 2.5 A
    /// // = 2.5 A, 50 % of 5 A.
    /// assert_eq!(margin(0).at, "buck output");
    /// assert!((margin(0).left() - -0.5).abs() < 1e-6);
    /// assert!((margin(0).share().unwrap() - -0.25).abs() < 1e-6);
    /// // With 5 A the buck has 50 % left, and the tightest is the lamp's
    /// // supply range instead: the buck's `5 V ±2%` reaches 5.1 V, 0.4 V
    /// // under the lamp's 5.5 V top, 0.4 / 5.5 = 7.3 %.
    /// assert_eq!(margin(1).at, "lamp.vin");
    /// assert!((margin(1).left() - 0.4).abs() < 1e-6);
    /// assert!((margin(1).share().unwrap() - 0.4 / 5.5).abs() < 1e-6);
    /// // The 5 A row's plan is the original with `with: { current: 5 A }`.
    /// assert!(sweep.variant(1).contains("buck: { use: regulator/buck-5v-5a, with: { current: 5 A } }"));
    /// ```
    pub fn new(
        base: &Checked,
        library: &Library,
        vary: &[String],
        max: usize,
    ) -> Result<Sweep, SweepError> {
        let file_name = base.sources.name(base.plan_source).to_string();
        let text = base.sources.text(base.plan_source).to_string();
        let root = syntax::parse(SourceId(0), &text).map_err(|e| {
            SweepError::Usage(format!("the plan could not be read again: {}", e.message))
        })?;
        let layout = tree::Layout::of(&text, &root);
        let mut sweep = Sweep {
            file_name,
            text,
            root,
            layout,
            classes: base
                .plan
                .parts
                .iter()
                .map(|p| (p.name.clone(), p.class.name()))
                .collect(),
            axes: Vec::new(),
        };
        match sweep.count_as_written(vary) {
            Some(n) if n <= max => {}
            counted => return Err(SweepError::TooMany(counted)),
        }
        let mut errors = Vec::new();
        if let Some(section) = sweep.root.get("sweep") {
            let section = section.clone();
            sweep.section_axes(&section, base, library, &mut errors);
        }
        if !errors.is_empty() {
            return Err(SweepError::Input(errors));
        }
        for argument in vary {
            let axis = sweep
                .vary_axis(argument, base, library)
                .map_err(|message| {
                    SweepError::Usage(format!("in `--vary {argument}`: {message}"))
                })?;
            match sweep.axes.iter_mut().find(|a| a.target == axis.target) {
                Some(existing) => *existing = axis,
                None => sweep.axes.push(axis),
            }
        }
        Ok(sweep)
    }

    /// How many combinations the section and arguments ask for, counted
    /// from how they are written (a `--vary` replacing a section key of the
    /// same spelling), before anything is read: a sweep too large to run is
    /// refused without reading its values.
    fn count_as_written(&self, vary: &[String]) -> Option<usize> {
        let mut counts: Vec<(String, usize)> = Vec::new();
        let section = self
            .root
            .get("sweep")
            .and_then(Node::as_map)
            .unwrap_or_default();
        for (key, body) in section {
            let n = body.as_seq().map_or(1, <[Node]>::len).max(1);
            counts.push((key.as_scalar().unwrap_or_default().to_string(), n));
        }
        for argument in vary {
            let (key, list) = argument.split_once('=').unwrap_or((argument, ""));
            let n = list.split(',').count();
            match counts.iter_mut().find(|(k, _)| k == key.trim()) {
                Some(entry) => entry.1 = n,
                None => counts.push((key.trim().to_string(), n)),
            }
        }
        counts
            .iter()
            .try_fold(1usize, |n, (_, c)| n.checked_mul(*c))
    }

    /// How many combinations the axes make; `None` when the count overflows.
    pub fn combinations(&self) -> Option<usize> {
        self.axes
            .iter()
            .try_fold(1usize, |n, a| n.checked_mul(a.values.len()))
    }

    /// The value index of each axis for combination `index` (odometer order,
    /// the last axis fastest).
    pub fn choice(&self, mut index: usize) -> Vec<usize> {
        let mut choice = vec![0; self.axes.len()];
        for (slot, axis) in choice.iter_mut().zip(&self.axes).rev() {
            *slot = index % axis.values.len();
            index /= axis.values.len();
        }
        choice
    }

    /// The plan's text with combination `index` written in: a whole plan.
    pub fn variant(&self, index: usize) -> String {
        apply(&self.text, self.changes(index))
    }

    fn changes(&self, index: usize) -> Vec<Splice> {
        let edits: Vec<(&Target, &str)> = self
            .axes
            .iter()
            .zip(self.choice(index))
            .map(|(axis, i)| (&axis.target, axis.values[i].as_str()))
            .collect();
        splices(&self.text, &self.root, &edits)
    }

    /// The variant's text and, when it can be built from the plan's tree
    /// (see `tree`), its YAML tree: the same as parsing the text.
    fn variant_and_tree(&self, index: usize) -> (String, Option<Node>) {
        let mut changes = self.changes(index);
        changes.sort_by_key(|s| (s.start, s.end));
        let text = apply(&self.text, changes.iter().map(Splice::clone).collect());
        let tree = self
            .layout
            .as_ref()
            .and_then(|layout| tree::variant_tree(layout, &self.root, &changes, &text));
        (text, tree)
    }

    /// Checks one combination.
    pub fn row(&self, index: usize, library: &Library) -> Row {
        let values = self
            .axes
            .iter()
            .zip(self.choice(index))
            .map(|(axis, i)| axis.values[i].clone())
            .collect();
        let (text, tree) = self.variant_and_tree(index);
        let outcome = match crate::check_tree(
            &self.file_name,
            std::sync::Arc::from(text.as_str()),
            tree,
            library,
        ) {
            Ok(checked) => Outcome::Checked(Box::new(verdict(&checked))),
            Err(failure) => Outcome::Unreadable(first_problem(&failure)),
        };
        Row {
            index,
            values,
            outcome,
        }
    }

    /// Checks every combination on `threads` threads (at least one); rows
    /// come back in combination order, the same for any number of threads.
    pub fn run(&self, library: &Library, threads: usize) -> Vec<Row> {
        let mut rows = Vec::new();
        let never = AtomicBool::new(false);
        self.run_streaming(library, threads, &never, |row| rows.push(row), |_| {});
        rows
    }

    /// Checks every combination on `threads` worker threads (at least one),
    /// handing each row to `on_row` on the calling thread in combination
    /// order as soon as every row before it is done: only the rows finished
    /// out of order wait, never the whole sweep. `tick` is called with how
    /// many rows are done after each row and about ten times a second.
    ///
    /// Setting `stop` stops the workers taking new combinations; the rows
    /// already finished are still handed over (in combination order, with
    /// gaps where a combination was never started). Returns whether every
    /// combination was checked.
    pub fn run_streaming(
        &self,
        library: &Library,
        threads: usize,
        stop: &AtomicBool,
        mut on_row: impl FnMut(Row),
        mut tick: impl FnMut(usize),
    ) -> bool {
        let total = self.combinations().unwrap_or(0);
        let threads = threads.clamp(1, total.max(1));
        let next = AtomicUsize::new(0);
        // Bounded: when rows are written slower than they are checked (a
        // slow pipe), the workers wait instead of piling rows up.
        let (send, receive) = std::sync::mpsc::sync_channel::<Row>(threads * 4);
        let mut done = 0;
        std::thread::scope(|scope| {
            for _ in 0..threads {
                let send = send.clone();
                let next = &next;
                scope.spawn(move || {
                    while !stop.load(Ordering::Relaxed) {
                        let i = next.fetch_add(1, Ordering::Relaxed);
                        if i >= total || send.send(self.row(i, library)).is_err() {
                            break;
                        }
                    }
                });
            }
            drop(send);
            // Rows finished ahead of one still being checked wait here.
            let mut waiting: std::collections::BTreeMap<usize, Row> = Default::default();
            let mut due = 0;
            loop {
                match receive.recv_timeout(std::time::Duration::from_millis(100)) {
                    Ok(row) => {
                        done += 1;
                        waiting.insert(row.index, row);
                        while let Some(row) = waiting.remove(&due) {
                            on_row(row);
                            due += 1;
                        }
                        tick(done);
                    }
                    Err(std::sync::mpsc::RecvTimeoutError::Timeout) => tick(done),
                    Err(std::sync::mpsc::RecvTimeoutError::Disconnected) => break,
                }
            }
            // Stopped: what finished after a gap, in order.
            for (_, row) in waiting {
                on_row(row);
            }
        });
        done == total
    }

    // ----- reading the axes ------------------------------------------------

    fn section_axes(
        &mut self,
        section: &Node,
        base: &Checked,
        library: &Library,
        errors: &mut Vec<InputError>,
    ) {
        let at = |span: Span| Span::new(base.plan_source, span.start, span.end);
        let Some(entries) = section.as_map() else {
            // `check` reports a section of the wrong shape.
            return;
        };
        for (key, body) in entries {
            let Some(name) = key.as_scalar() else {
                continue;
            };
            let target = match self.target(name, base) {
                Ok(target) => target,
                Err((message, hint)) => {
                    errors.push(InputError {
                        message,
                        span: at(key.span),
                        hint,
                    });
                    continue;
                }
            };
            let items: Vec<&Node> = match &body.kind {
                NodeKind::Seq(items) => items.iter().collect(),
                NodeKind::Scalar(_) => vec![body],
                _ => Vec::new(),
            };
            let mut values = Vec::new();
            for item in items {
                let Some(value) = item.as_scalar() else {
                    continue;
                };
                if values.iter().any(|v| v == value) {
                    errors.push(InputError {
                        message: format!("`{value}` is listed twice for `{name}`"),
                        span: at(item.span),
                        hint: Some("list each value once".into()),
                    });
                    continue;
                }
                if let Err((message, hint, offset)) = self.try_value(&target, value, library) {
                    // Pointed within the value when it is written plain.
                    let plain = self.text.get(item.span.start..item.span.end) == Some(value);
                    let span = if plain {
                        item.span.within(offset..item.span.end - item.span.start)
                    } else {
                        item.span
                    };
                    errors.push(InputError {
                        message,
                        span: at(span),
                        hint,
                    });
                    continue;
                }
                values.push(value.to_string());
            }
            if values.is_empty() {
                continue;
            }
            self.axes.push(Axis {
                key: name.to_string(),
                target,
                values,
            });
        }
    }

    fn vary_axis(&self, argument: &str, base: &Checked, library: &Library) -> Result<Axis, String> {
        let with_hint = |(message, hint): (String, Option<String>)| match hint {
            Some(hint) => format!("{message} ({hint})"),
            None => message,
        };
        let Some((key, list)) = argument.split_once('=') else {
            return Err(
                "write the key, `=` and the values: `--vary VMOT.wire=16 AWG,14 AWG`".into(),
            );
        };
        let key = key.trim();
        let target = self.target(key, base).map_err(with_hint)?;
        let mut values: Vec<String> = Vec::new();
        for value in list.split(',').map(str::trim) {
            if value.is_empty() {
                return Err("a value is empty; separate values with single commas".into());
            }
            if values.iter().any(|v| v == value) {
                return Err(format!("`{value}` is given twice"));
            }
            self.try_value(&target, value, library)
                .map_err(|(message, hint, _)| with_hint((message, hint)))?;
            values.push(value.to_string());
        }
        Ok(Axis {
            key: key.to_string(),
            target,
            values,
        })
    }

    /// What a key names, from the plan's tree (nets as written, not those
    /// a cable adds) and its reading (each part's class).
    fn target(&self, key: &str, base: &Checked) -> Result<Target, (String, Option<String>)> {
        let section_names = |section: &str| -> Vec<String> {
            self.root
                .get(section)
                .and_then(Node::as_map)
                .map(|entries| {
                    entries
                        .iter()
                        .filter_map(|(k, _)| k.as_scalar().map(str::to_string))
                        .collect()
                })
                .unwrap_or_default()
        };
        let suggest = |word: &str, candidates: &[String], what: &str| {
            closest(word, candidates.iter().map(String::as_str))
                .map(|s| format!("did you mean `{s}`?"))
                .or_else(|| {
                    (!candidates.is_empty() && candidates.len() <= 12)
                        .then(|| format!("the plan's {what}: {}", quoted(candidates)))
                })
        };
        let parts = section_names("parts");
        let nets = section_names("nets");
        let modes = section_names("modes");
        let pieces: Vec<&str> = key.split('.').collect();
        match pieces.as_slice() {
            ["limits", field] => {
                let keys = format::keys(format::LIMITS);
                if keys.contains(field) {
                    Ok(Target::Limit {
                        field: field.to_string(),
                    })
                } else {
                    let keys: Vec<String> = keys.iter().map(|k| k.to_string()).collect();
                    Err((
                        format!("there is no limit `{field}`"),
                        suggest(field, &keys, "limits"),
                    ))
                }
            }
            ["modes", mode, field] => {
                if !modes.iter().any(|m| m == mode) {
                    return Err((
                        format!("the plan has no mode `{mode}`"),
                        suggest(mode, &modes, "modes"),
                    ));
                }
                if *field != "lasts" {
                    return Err((
                        format!("a mode's `{field}` is not a value to vary"),
                        Some(format!("vary how long it lasts: `modes.{mode}.lasts`")),
                    ));
                }
                Ok(Target::ModeLasts {
                    mode: mode.to_string(),
                })
            }
            [name] if parts.iter().any(|p| p == name) => {
                let part = base.plan.parts.iter().find(|p| p.name == *name);
                if part.is_some_and(|p| p.library_id.is_none()) {
                    return Err((
                        format!("`{name}` is written inline and has no library id"),
                        Some(format!("vary one of its fields: `{name}.FIELD`")),
                    ));
                }
                Ok(Target::PartId {
                    part: name.to_string(),
                })
            }
            [name, field] if nets.iter().any(|n| n == name) && !parts.iter().any(|p| p == name) => {
                let keys = format::keys(format::NET);
                if keys.contains(field) && *field != "pins" {
                    Ok(Target::NetField {
                        net: name.to_string(),
                        field: field.to_string(),
                    })
                } else {
                    let keys: Vec<String> = keys
                        .iter()
                        .filter(|k| **k != "pins")
                        .map(|k| k.to_string())
                        .collect();
                    Err((
                        format!("a net's `{field}` is not a value to vary"),
                        suggest(field, &keys, "net fields"),
                    ))
                }
            }
            [name, field]
                if name.contains('+')
                    && !parts.iter().any(|p| p == name)
                    && !nets.iter().any(|n| n == name) =>
            {
                let Some(named) = split_nets(name, &nets) else {
                    let unknown = name
                        .split('+')
                        .find(|piece| !piece.is_empty() && !nets.iter().any(|n| n == piece))
                        .unwrap_or(name);
                    return Err((
                        format!("the plan has no net `{unknown}` (in `{name}`)"),
                        suggest(unknown, &nets, "nets").or(Some(
                            "join the nets to vary together with `+`: `VMOT+GND_MOT.wire`".into(),
                        )),
                    ));
                };
                if let Some(twice) = named
                    .iter()
                    .enumerate()
                    .find_map(|(i, n)| named[..i].contains(n).then_some(n))
                {
                    return Err((format!("`{twice}` is named twice in `{name}`"), None));
                }
                let keys = format::keys(format::NET);
                if !keys.contains(field) || *field == "pins" {
                    let keys: Vec<String> = keys
                        .iter()
                        .filter(|k| **k != "pins")
                        .map(|k| k.to_string())
                        .collect();
                    return Err((
                        format!("a net's `{field}` is not a value to vary"),
                        suggest(field, &keys, "net fields"),
                    ));
                }
                Ok(Target::NetsField {
                    nets: named,
                    field: field.to_string(),
                })
            }
            [name, field] if parts.iter().any(|p| p == name) => {
                let part = base.plan.parts.iter().find(|p| p.name == *name);
                let Some(part) = part else {
                    return Err((format!("the part `{name}` could not be read"), None));
                };
                let class = format::class(part.class.name());
                let keys: Vec<String> = class
                    .map(|c| format::keys(c.fields))
                    .unwrap_or_default()
                    .iter()
                    .chain(&format::keys(format::PART_FIELDS))
                    .map(|k| k.to_string())
                    .collect();
                if keys.iter().any(|k| k == field) {
                    Ok(Target::PartField {
                        part: name.to_string(),
                        field: field.to_string(),
                        library: part.library_id.is_some(),
                    })
                } else {
                    Err((
                        format!(
                            "class `{}` has no field `{field}` (part `{name}`)",
                            part.class.name()
                        ),
                        suggest(field, &keys, "fields of the class"),
                    ))
                }
            }
            [name, ..] => {
                let mut names: Vec<String> = parts.clone();
                names.extend(nets.iter().cloned());
                names.push("limits".into());
                names.push("modes".into());
                let shape = "keys are `PART` (its library id), `PART.FIELD`, `NET.wire`, \
                             `NET.length`, `NET+NET.wire`, `limits.KEY` and `modes.MODE.lasts`";
                let known = parts.iter().chain(&nets).any(|n| n == name)
                    || matches!(*name, "limits" | "modes");
                if known {
                    Err((
                        format!("`{key}` is not a value to vary"),
                        Some(shape.into()),
                    ))
                } else {
                    Err((
                        format!("the plan has no part or net `{name}`"),
                        closest(name, names.iter().map(String::as_str))
                            .map(|s| format!("did you mean `{s}`?"))
                            .or(Some(shape.into())),
                    ))
                }
            }
            [] => Err(("the key is empty".into(), None)),
        }
    }

    /// Reads the plan with one value written in; the first problem found
    /// at the value itself, with its hint and its byte offset within the
    /// value as written. A problem elsewhere (a net given a length before
    /// another axis gives its wire) is left to the combinations, whose rows
    /// say when values do not go together.
    fn try_value(
        &self,
        target: &Target,
        value: &str,
        library: &Library,
    ) -> Result<(), (String, Option<String>, usize)> {
        if let Target::PartId { part } = target {
            self.same_class(part, value, library)?;
        }
        let changes = splices(&self.text, &self.root, &[(target, value)]);
        let written = scalar(value);
        // Where the value sits in the text after each change (a key naming
        // several nets makes one change per net).
        let mut shift: isize = 0;
        let mut sorted: Vec<&Splice> = changes.iter().collect();
        sorted.sort_by_key(|s| s.start);
        let mut ats = Vec::new();
        for change in sorted {
            if let Some(i) = change.text.rfind(&written) {
                ats.push((change.start as isize + shift) as usize + i);
            }
            shift += change.text.len() as isize - (change.end - change.start) as isize;
        }
        let text = apply(&self.text, changes);
        let Err(failure) = crate::read(&self.file_name, &text, library) else {
            return Ok(());
        };
        for error in &failure.errors {
            if error.span.source != failure.plan_source {
                continue;
            }
            if let Some(at) = ats
                .iter()
                .find(|&&at| (at..=at.saturating_add(written.len())).contains(&error.span.start))
            {
                return Err((
                    error.message.clone(),
                    error.hint.clone(),
                    error.span.start - at,
                ));
            }
        }
        Ok(())
    }

    /// A part's library id can change only to a part of the same class: a
    /// regulator where a battery was would not be the same design choice,
    /// and the part's nets and modes would not read.
    fn same_class(
        &self,
        part: &str,
        id: &str,
        library: &Library,
    ) -> Result<(), (String, Option<String>, usize)> {
        let Some((_, class)) = self.classes.iter().find(|(name, _)| name == part) else {
            return Ok(());
        };
        // An unknown or unreadable id is the reader's to report.
        let Some(Ok(chosen)) = library.read_part(id) else {
            return Ok(());
        };
        let chosen = chosen.class.name();
        if chosen == *class {
            return Ok(());
        }
        let same: Vec<String> = library
            .ids()
            .filter(|other| {
                library
                    .read_part(other)
                    .is_some_and(|p| p.is_ok_and(|p| p.class.name() == *class))
            })
            .take(8)
            .map(str::to_string)
            .collect();
        let hint = if same.is_empty() {
            format!("choose a library part of class `{class}`")
        } else {
            format!("choose a `{class}` part: {}", quoted(&same))
        };
        Err((
            format!("`{id}` is a {chosen}, but `{part}` is a {class}"),
            Some(hint),
            0,
        ))
    }
}

fn quoted(words: &[String]) -> String {
    words
        .iter()
        .map(|w| format!("`{w}`"))
        .collect::<Vec<_>>()
        .join(", ")
}

fn first_problem(failure: &InputFailure) -> String {
    failure.errors.first().map_or_else(
        || "the plan could not be read".into(),
        |e| e.message.clone(),
    )
}

/// The sum of some values; `None` when there are none.
fn sum<T: std::ops::Add<Output = T>>(mut values: impl Iterator<Item = T>) -> Option<T> {
    let first = values.next()?;
    Some(values.fold(first, |total, v| total + v))
}

/// The row's figures from a checked variant.
fn verdict(checked: &Checked) -> Verdict {
    let count = |s: Severity| checked.findings.iter().filter(|f| f.severity == s).count();
    let first_error = checked
        .findings
        .iter()
        .find(|f| f.severity == Severity::Error)
        .map(|f| (f.rule.to_string(), f.message.clone()));
    let budget = budget(checked);
    let (mut runtime, mut peak_current) = (None, None);
    if budget.solved {
        for battery in &budget.batteries {
            if let Some(r) = &battery.runtime
                && runtime.is_none_or(|t: Time| r.time < t)
            {
                runtime = Some(r.time);
            }
            if peak_current.is_none_or(|i: ElectricCurrent| battery.peak_current > i) {
                peak_current = Some(battery.peak_current);
            }
        }
    }
    Verdict {
        errors: count(Severity::Error),
        warnings: count(Severity::Warning),
        notes: count(Severity::Note),
        first_error,
        runtime,
        peak_current,
        margin: checked.margins.first().cloned(),
        mass: sum(checked.plan.parts.iter().filter_map(|p| p.mass)),
        without_mass: checked
            .plan
            .parts
            .iter()
            .filter(|p| p.mass.is_none())
            .count(),
        cost: sum(checked.plan.parts.iter().filter_map(|p| p.cost)),
        without_cost: checked
            .plan
            .parts
            .iter()
            .filter(|p| p.cost.is_none())
            .count(),
    }
}

// ----- writing values into the text ----------------------------------------

/// One change to the text: bytes `start..end` become `text`.
#[derive(Clone, Debug)]
struct Splice {
    start: usize,
    end: usize,
    text: String,
}

/// The plan's text with each target set to its value. Only what changes is
/// rewritten: a value in place, a missing key as a new line of its block
/// mapping (or a new entry of its `{ }` mapping), a net written as a list of
/// pins as a mapping; everything else, comments too, stays as written.
#[cfg(test)]
fn edit_text(text: &str, root: &Node, edits: &[(&Target, &str)]) -> String {
    apply(text, splices(text, root, edits))
}

/// The text with the splices made (they never overlap).
fn apply(text: &str, mut splices: Vec<Splice>) -> String {
    splices.sort_by_key(|s| std::cmp::Reverse((s.start, s.end)));
    let mut out = text.to_string();
    for s in splices {
        out.replace_range(s.start..s.end, &s.text);
    }
    out
}

/// The changes that write the values into the text.
fn splices(text: &str, root: &Node, edits: &[(&Target, &str)]) -> Vec<Splice> {
    let expanded: Vec<(Target, &str)> = edits
        .iter()
        .flat_map(|(target, value)| target.each().into_iter().map(move |t| (t, *value)))
        .collect();
    let edits: Vec<(&Target, &str)> = expanded.iter().map(|(t, v)| (t, *v)).collect();
    let mut edited = root.clone();
    let mut anchors: Vec<Vec<String>> = Vec::new();
    let mut splices = Vec::new();
    for (target, value) in &edits {
        let path = target.path();
        set(&mut edited, &path, value);
        // The deepest node of the path the text already has.
        let mut node = root;
        let mut depth = 0;
        while depth < path.len() {
            match node.get(path[depth]) {
                Some(child) if node.as_map().is_some() => {
                    node = child;
                    depth += 1;
                }
                _ => break,
            }
        }
        if depth == path.len() && matches!(node.kind, NodeKind::Null) {
            splices.push(null_splice(text, node, &lookup(&edited, &path)));
        } else if depth == path.len() {
            // The value is written: replace it in place.
            let (start, end) = extent(text, node);
            splices.push(Splice {
                start,
                end,
                text: flow(&lookup(&edited, &path)),
            });
        } else {
            let anchor: Vec<String> = path[..depth].iter().map(|s| s.to_string()).collect();
            if !anchors.contains(&anchor) {
                anchors.push(anchor);
            }
        }
    }
    for anchor in anchors {
        let anchor: Vec<&str> = anchor.iter().map(String::as_str).collect();
        let original = lookup(root, &anchor);
        let changed = lookup(&edited, &anchor);
        splices.push(insertion(text, original, &changed, anchor.is_empty()));
    }
    splices
}

/// How the text changes where an existing node gains what it lacks.
fn insertion(text: &str, original: Node, changed: &Node, is_root: bool) -> Splice {
    let new_entries = || -> Vec<(String, String)> {
        changed
            .as_map()
            .unwrap_or_default()
            .iter()
            .filter(|(k, _)| {
                let key = k.as_scalar().unwrap_or_default();
                original.get(key).is_none()
            })
            .map(|(k, v)| (flow(k), flow(v)))
            .collect()
    };
    match &original.kind {
        NodeKind::Map(entries) if !is_flow(text, &original) => {
            let (_, end) = extent(text, &original);
            // After the rest of the last line (a comment stays where it is).
            let at = text[end..]
                .find(['\n', '\r'])
                .map_or(text.len(), |i| end + i);
            let indent = if is_root {
                0
            } else {
                let start = entries
                    .first()
                    .map_or(original.span.start, |(k, _)| k.span.start);
                let line_start = text[..start].rfind(['\n', '\r']).map_or(0, |i| i + 1);
                text[line_start..start].chars().count()
            };
            let mut added = String::new();
            for (key, value) in new_entries() {
                added.push('\n');
                added.push_str(&" ".repeat(indent));
                added.push_str(&format!("{key}: {value}"));
            }
            if is_root && at == text.len() && text.ends_with(['\n', '\r']) {
                // The text ends with a line break: add lines before the end.
                let trimmed = text.trim_end_matches(['\n', '\r']).len();
                return Splice {
                    start: trimmed,
                    end: trimmed,
                    text: added,
                };
            }
            Splice {
                start: at,
                end: at,
                text: added,
            }
        }
        NodeKind::Map(entries) => {
            let (_, end) = extent(text, &original);
            // Just after the last entry, before the closing brace.
            let close = end.saturating_sub(1);
            let at = text[..close].trim_end().len();
            let mut added = String::new();
            for (i, (key, value)) in new_entries().into_iter().enumerate() {
                if i > 0 || !entries.is_empty() {
                    added.push_str(", ");
                } else {
                    added.push(' ');
                }
                added.push_str(&format!("{key}: {value}"));
            }
            if entries.is_empty() {
                added.push(' ');
            }
            Splice {
                start: at,
                end: at,
                text: added,
            }
        }
        NodeKind::Null => null_splice(text, &original, changed),
        _ => {
            let (start, end) = extent(text, &original);
            Splice {
                start,
                end,
                text: flow(changed),
            }
        }
    }
}

/// An empty value (`key:` with nothing after it) given one: the reader
/// places it at the key's colon, so the value goes after the colon.
fn null_splice(text: &str, original: &Node, changed: &Node) -> Splice {
    let mut start = original.span.start;
    if text[start..].starts_with(':') {
        start += 1;
    }
    let end = original.span.end.max(start);
    Splice {
        start,
        end,
        text: format!(" {}", flow(changed)),
    }
}

/// The node at a path (a clone; an empty node when the path is missing).
fn lookup(node: &Node, path: &[&str]) -> Node {
    let mut node = node;
    for key in path {
        match node.get(key) {
            Some(child) => node = child,
            None => {
                return Node {
                    kind: NodeKind::Null,
                    span: node.span,
                };
            }
        }
    }
    node.clone()
}

/// Sets the value at a path, making mappings where it leads through nothing;
/// a net's list of pins becomes `{ pins: [...] }`.
fn set(node: &mut Node, path: &[&str], value: &str) {
    let span = node.span;
    let Some((first, rest)) = path.split_first() else {
        node.kind = NodeKind::Scalar(value.to_string());
        return;
    };
    let blank = |kind| Node { kind, span };
    match &mut node.kind {
        NodeKind::Map(_) => {}
        NodeKind::Seq(items) => {
            let pins = std::mem::take(items);
            node.kind = NodeKind::Map(vec![(
                blank(NodeKind::Scalar("pins".into())),
                blank(NodeKind::Seq(pins)),
            )]);
        }
        _ => node.kind = NodeKind::Map(Vec::new()),
    }
    let NodeKind::Map(entries) = &mut node.kind else {
        return;
    };
    let position = entries
        .iter()
        .position(|(k, _)| k.as_scalar() == Some(first));
    let index = match position {
        Some(i) => i,
        None => {
            entries.push((
                blank(NodeKind::Scalar(first.to_string())),
                blank(NodeKind::Null),
            ));
            entries.len() - 1
        }
    };
    set(&mut entries[index].1, rest, value);
}

/// Whether a collection is written in flow style (`[ ]`, `{ }`).
fn is_flow(text: &str, node: &Node) -> bool {
    text[node.span.start..].starts_with(['[', '{'])
}

/// The bytes a node takes in the text. The reader gives a collection only
/// its first position; its end is its last descendant's end (and, in flow
/// style, the closing bracket after it).
fn extent(text: &str, node: &Node) -> (usize, usize) {
    let start = node.span.start;
    match &node.kind {
        NodeKind::Scalar(_) | NodeKind::Null => {
            // A folded scalar's span takes its line break with it.
            let end = start + text[start..node.span.end].trim_end().len();
            (start, end)
        }
        NodeKind::Seq(_) | NodeKind::Map(_) => {
            let children: Vec<&Node> = match &node.kind {
                NodeKind::Seq(items) => items.iter().collect(),
                NodeKind::Map(entries) => entries.iter().flat_map(|(k, v)| [k, v]).collect(),
                _ => Vec::new(),
            };
            let inner_end = children
                .iter()
                .map(|c| extent(text, c).1)
                .max()
                .unwrap_or(start)
                .max(start);
            if is_flow(text, node) {
                let from = inner_end.max(start + 1);
                (start, closing(text, from))
            } else {
                // A block list starts at its first `-`.
                let start = match &node.kind {
                    NodeKind::Seq(_) => {
                        let before = text[..start].trim_end_matches([' ', '\t']);
                        if before.ends_with('-') {
                            before.len() - 1
                        } else {
                            start
                        }
                    }
                    _ => start,
                };
                (start, inner_end)
            }
        }
    }
}

/// Just past the first closing bracket at or after `from`, skipping
/// whitespace, commas and comments.
fn closing(text: &str, from: usize) -> usize {
    let bytes = text.as_bytes();
    let mut i = from;
    while i < bytes.len() {
        match bytes[i] {
            b']' | b'}' => return i + 1,
            b'#' => {
                while i < bytes.len() && bytes[i] != b'\n' {
                    i += 1;
                }
            }
            _ => i += 1,
        }
    }
    text.len()
}

/// A node written in YAML flow style, readable back as the same tree.
fn flow(node: &Node) -> String {
    match &node.kind {
        NodeKind::Null => "~".into(),
        NodeKind::Scalar(s) => scalar(s),
        NodeKind::Seq(items) => format!(
            "[{}]",
            items.iter().map(flow).collect::<Vec<_>>().join(", ")
        ),
        NodeKind::Map(entries) if entries.is_empty() => "{}".into(),
        NodeKind::Map(entries) => format!(
            "{{ {} }}",
            entries
                .iter()
                .map(|(k, v)| format!("{}: {}", flow(k), flow(v)))
                .collect::<Vec<_>>()
                .join(", ")
        ),
    }
}

/// A scalar as written: plain when it reads back as the same text in any
/// context, else double-quoted (JSON's string syntax is YAML's).
fn scalar(text: &str) -> String {
    let plain = !text.is_empty()
        && text.trim() == text
        && !text.starts_with([
            '-', '?', ':', ',', '[', ']', '{', '}', '#', '&', '*', '!', '|', '>', '\'', '"', '%',
            '@', '`',
        ])
        && !text.contains([',', '[', ']', '{', '}', '\n', '\r', '\t'])
        && !text.contains(": ")
        && !text.contains(" #")
        && !text.ends_with(':')
        && !matches!(text, "~" | "null" | "Null" | "NULL")
        && !text.chars().any(syntax::is_unsafe_on_terminal);
    // A leading `-` is plain when a digit follows (`-5 V`).
    let negative = text.starts_with('-') && text[1..].starts_with(|c: char| c.is_ascii_digit());
    if plain || (negative && !text.contains([',', '[', ']', '{', '}', '#', ':'])) {
        text.to_string()
    } else {
        serde_json::to_string(text).unwrap_or_else(|_| format!("{text:?}"))
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn tree(text: &str) -> Node {
        syntax::parse(SourceId(0), text).expect("YAML")
    }

    fn part_field(part: &str, field: &str, library: bool) -> Target {
        Target::PartField {
            part: part.into(),
            field: field.into(),
            library,
        }
    }

    #[test]
    fn a_written_value_is_replaced_in_place_and_comments_stay() {
        let text = "parts:\n  buck: { use: regulator/buck-5v-5a }  # keep\nnets:\n  V: { pins: [a.b], wire: 14 AWG } # run\n";
        let net = Target::NetField {
            net: "V".into(),
            field: "wire".into(),
        };
        let out = edit_text(text, &tree(text), &[(&net, "16 AWG")]);
        assert_eq!(
            out,
            "parts:\n  buck: { use: regulator/buck-5v-5a }  # keep\nnets:\n  V: { pins: [a.b], wire: 16 AWG } # run\n"
        );
    }

    #[test]
    fn missing_keys_join_their_mapping_in_its_own_style() {
        let text = "parts:\n  pack:\n    use: battery/lipo-3s   # the pack\n  buck: { use: regulator/buck-5v-5a }\nnets:\n  V: [a.b, c.d]\n";
        let capacity = part_field("pack", "capacity", true);
        let current = part_field("buck", "current", true);
        let drop = Target::Limit {
            field: "wire_drop".into(),
        };
        let wire = Target::NetField {
            net: "V".into(),
            field: "wire".into(),
        };
        let out = edit_text(
            text,
            &tree(text),
            &[
                (&capacity, "4 Ah"),
                (&current, "3 A"),
                (&drop, "3 %"),
                (&wire, "18 AWG"),
            ],
        );
        assert_eq!(
            out,
            "parts:\n  pack:\n    use: battery/lipo-3s   # the pack\n    with: { capacity: 4 Ah }\n  buck: { use: regulator/buck-5v-5a, with: { current: 3 A } }\nnets:\n  V: { pins: [a.b, c.d], wire: 18 AWG }\nlimits: { wire_drop: 3 % }\n"
        );
        // The result reads back with the values in place.
        let back = tree(&out);
        let get = |path: &[&str]| lookup(&back, path).as_scalar().map(str::to_string);
        assert_eq!(
            get(&["parts", "pack", "with", "capacity"]).as_deref(),
            Some("4 Ah")
        );
        assert_eq!(get(&["nets", "V", "wire"]).as_deref(), Some("18 AWG"));
        assert_eq!(get(&["limits", "wire_drop"]).as_deref(), Some("3 %"));
    }

    #[test]
    fn two_new_keys_under_one_missing_mapping_make_one_entry() {
        let text = "railcheck: 1\nlimits:\nparts:\n  m: { class: motor }\n";
        let a = Target::Limit {
            field: "wire_drop".into(),
        };
        let b = Target::Limit {
            field: "derate".into(),
        };
        let out = edit_text(text, &tree(text), &[(&a, "3 %"), (&b, "70 %")]);
        assert_eq!(
            out,
            "railcheck: 1\nlimits: { wire_drop: 3 %, derate: 70 % }\nparts:\n  m: { class: motor }\n"
        );
    }

    #[test]
    fn awkward_scalars_are_quoted_and_read_back_as_written() {
        for text in [
            "a: b", "x, y", "[1]", "null", "~", "#c", "-x", " lead", "é 5 Ω", "5 V ±2%",
        ] {
            let doc = format!("k: {}\n", scalar(text));
            assert_eq!(
                tree(&doc).get("k").and_then(Node::as_scalar),
                Some(text),
                "{doc}"
            );
        }
        assert_eq!(scalar("16 AWG"), "16 AWG");
        assert_eq!(scalar("-5 V"), "-5 V");
    }

    #[test]
    fn every_part_and_net_of_the_examples_takes_a_value_and_reads_back() {
        for text in [
            include_str!("../examples/orchard-rover.yaml"),
            include_str!("../examples/greenhouse-picker.yaml"),
            include_str!("../examples/first-draft.yaml"),
            "parts:\n  p: { use: x }\nnets:\n  X:\n    - a.b   # first\n    - c.d\n  Y: []\n",
        ] {
            let root = tree(text);
            let names = |section: &str| -> Vec<String> {
                lookup(&root, &[section])
                    .as_map()
                    .unwrap_or_default()
                    .iter()
                    .filter_map(|(k, _)| k.as_scalar().map(str::to_string))
                    .collect()
            };
            let mut targets = Vec::new();
            for part in names("parts") {
                let library = root
                    .get("parts")
                    .and_then(|p| p.get(&part))
                    .and_then(|p| p.get("use"))
                    .is_some();
                targets.push(part_field(&part, "current", library));
                if library {
                    targets.push(Target::PartId { part });
                }
            }
            for net in names("nets") {
                targets.push(Target::NetField {
                    net: net.clone(),
                    field: "wire".into(),
                });
                targets.push(Target::NetField {
                    net,
                    field: "insulation".into(),
                });
            }
            targets.push(Target::Limit {
                field: "derate".into(),
            });
            // Each alone, and all at once.
            let all: Vec<(&Target, &str)> = targets.iter().map(|t| (t, "7 A")).collect();
            let layout = tree::Layout::of(text, &root);
            for edits in all.iter().map(|e| vec![*e]).chain([all.clone()]) {
                let out = edit_text(text, &root, &edits);
                let back = syntax::parse(SourceId(0), &out)
                    .unwrap_or_else(|e| panic!("{}:\n{out}", e.message));
                // The tree built from the plan's and the changed entries is
                // the tree of the whole variant, spans and all.
                let mut changes = splices(text, &root, &edits);
                changes.sort_by_key(|s| (s.start, s.end));
                if let Some(layout) = &layout {
                    match tree::variant_tree(layout, &root, &changes, &out) {
                        Some(built) => assert_eq!(built, back, "{edits:?}:\n{out}"),
                        None => assert!(edits.len() > 1, "{edits:?}:\n{out}"),
                    }
                }
                for (target, value) in &edits {
                    assert_eq!(
                        lookup(&back, &target.path()).as_scalar(),
                        Some(*value),
                        "{target:?}:\n{out}"
                    );
                }
                // Nothing else changed: every other part and net is still there.
                for section in ["parts", "nets"] {
                    assert_eq!(
                        lookup(&back, &[section]).as_map().map(<[_]>::len),
                        lookup(&root, &[section]).as_map().map(<[_]>::len)
                    );
                }
            }
        }
    }
}

//! The margins the rules compare: each rule that holds a computed value
//! against a rating or limit records the comparison it made (at the
//! operating point it judged), whether or not a finding follows. Nothing
//! here decides anything: the numbers are the rule's own, so a margin never
//! disagrees with the finding beside it.
//!
//! Recording is cheap and optional: a [`Context`](super::Context) without a
//! [`Margins`] recorder skips it. The recorder keeps only the tightest
//! comparison of each kind of rating, so its size does not grow with the plan.
//!
//! Not for: deciding findings (that is each rule's own comparison).

use super::Unit;
use crate::analysis::{BatteryState, OperatingPoint};
use crate::model::Plan;
use std::cell::RefCell;

/// The kinds of rating a margin can be taken against, one per comparison
/// the rules make.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash, PartialOrd, Ord)]
pub enum RatingKind {
    /// A wire's ampacity against its continuous current (`wire/ampacity`).
    WireAmpacity,
    /// The wiring drop to a load against `limits.wire_drop` (`wire/drop`).
    WireDrop,
    /// A fuse's rating against 125 % of its continuous current
    /// (`fuse/undersized`).
    FuseRating,
    /// A regulator's output current rating (`current/over-rating`).
    RegulatorCurrent,
    /// A driver channel's continuous rating (`current/over-rating`).
    DriverChannel,
    /// A driver channel's peak rating against a stall (`driver/stall`).
    DriverPeak,
    /// A switch's or connector contact's rating (`current/over-rating`).
    ContactCurrent,
    /// Another output's current limit: a board's supply output, a USB port
    /// (`current/over-rating`).
    OutputCurrent,
    /// A battery's maximum discharge current (`battery/discharge`).
    BatteryDischarge,
    /// A supply pin's absolute maximum voltage (`voltage/over-max`).
    SupplyMax,
    /// The top of a supply pin's operating range (`voltage/over-range`).
    SupplyRangeMax,
    /// The bottom of a supply pin's operating range (`voltage/under-range`).
    SupplyRangeMin,
    /// A driver's high level against a receiver's VIH (`logic/high-margin`).
    LogicHigh,
    /// A receiver's VIL against a driver's low level (`logic/low-margin`).
    LogicLow,
    /// A receiver's input ceiling against the highest level driven
    /// (`logic/overvoltage`).
    LogicCeiling,
}

impl RatingKind {
    /// How reports name the rating (`wire ampacity`).
    pub fn name(self) -> &'static str {
        match self {
            RatingKind::WireAmpacity => "wire ampacity",
            RatingKind::WireDrop => "wire drop limit",
            RatingKind::FuseRating => "fuse rating (125 % of continuous)",
            RatingKind::RegulatorCurrent => "regulator current",
            RatingKind::DriverChannel => "driver channel current",
            RatingKind::DriverPeak => "driver channel peak",
            RatingKind::ContactCurrent => "contact current",
            RatingKind::OutputCurrent => "output current",
            RatingKind::BatteryDischarge => "battery discharge",
            RatingKind::SupplyMax => "supply absolute maximum",
            RatingKind::SupplyRangeMax => "supply range maximum",
            RatingKind::SupplyRangeMin => "supply range minimum",
            RatingKind::LogicHigh => "logic high threshold",
            RatingKind::LogicLow => "logic low threshold",
            RatingKind::LogicCeiling => "logic input ceiling",
        }
    }
}

/// One comparison a rule made: a computed value held against a limit.
#[derive(Clone, Debug, PartialEq)]
pub struct Margin {
    /// What the limit is.
    pub kind: RatingKind,
    /// The id of the rule that made the comparison.
    pub rule: &'static str,
    /// Where: a part, a pin, a net or a conductor, as reports name it
    /// (`buck output`, `VMOT`, `imu.vcc`).
    pub at: String,
    /// The computed value (in `unit`).
    pub value: f64,
    /// The limit it is held against (in `unit`).
    pub limit: f64,
    /// The unit of `value` and `limit`.
    pub unit: Unit,
    /// Whether the limit is a maximum (a current rating) rather than a
    /// minimum (the bottom of a voltage range).
    pub upper: bool,
    /// The mode the comparison was judged in, when it depends on one.
    pub mode: Option<String>,
    /// The battery state, when it depends on one.
    pub battery: Option<BatteryState>,
}

impl Margin {
    /// A value held against a maximum.
    pub fn below(kind: RatingKind, rule: &'static str, value: f64, limit: f64, unit: Unit) -> Self {
        Margin {
            kind,
            rule,
            at: String::new(),
            value,
            limit,
            unit,
            upper: true,
            mode: None,
            battery: None,
        }
    }

    /// A value held against a minimum.
    pub fn above(kind: RatingKind, rule: &'static str, value: f64, limit: f64, unit: Unit) -> Self {
        Margin {
            upper: false,
            ..Margin::below(kind, rule, value, limit, unit)
        }
    }

    /// Names where the comparison is (backticks of message text dropped).
    pub fn at(mut self, place: &str) -> Self {
        self.at = place.replace('`', "");
        self
    }

    /// Records the operating point it was judged at.
    pub fn at_point(mut self, plan: &Plan, point: &OperatingPoint) -> Self {
        self.mode = Some(point.mode.name(plan).to_string());
        self.battery = Some(point.battery);
        self
    }

    /// Records an operating point when there is one.
    pub fn at_some_point(self, plan: &Plan, point: Option<&OperatingPoint>) -> Self {
        match point {
            Some(point) => self.at_point(plan, point),
            None => self,
        }
    }

    /// How much is left before the limit, in `unit`: negative when the
    /// limit is passed.
    pub fn left(&self) -> f64 {
        if self.upper {
            self.limit - self.value
        } else {
            self.value - self.limit
        }
    }

    /// What is left as a share of the limit (0.25 = 25 %); negative when the
    /// limit is passed. A zero limit gives no share.
    pub fn share(&self) -> Option<f64> {
        let share = self.left() / self.limit.abs();
        (self.limit != 0.0 && share.is_finite()).then_some(share)
    }

    /// Whether this margin is tighter than `other`: a smaller share (a
    /// margin without one only beats another without one, by absolute value).
    pub fn tighter_than(&self, other: &Margin) -> bool {
        match (self.share(), other.share()) {
            (Some(a), Some(b)) => a < b,
            (Some(_), None) => true,
            (None, Some(_)) => false,
            (None, None) => self.left() < other.left(),
        }
    }
}

/// The recorder the rules write their comparisons into: the tightest of
/// each kind of rating.
#[derive(Debug, Default)]
pub struct Margins {
    tightest: RefCell<Vec<Margin>>,
}

impl Margins {
    /// Keeps `margin` when it is the tightest of its kind so far (the first
    /// one on ties, so the result follows rule order, not float noise).
    pub fn record(&self, margin: Margin) {
        if !margin.value.is_finite() || !margin.limit.is_finite() {
            return;
        }
        let mut tightest = self.tightest.borrow_mut();
        match tightest.iter_mut().find(|m| m.kind == margin.kind) {
            Some(kept) if margin.tighter_than(kept) => *kept = margin,
            Some(_) => {}
            None => tightest.push(margin),
        }
    }

    /// Keeps `margin`, once `place` has named where and when, when it is
    /// the tightest of its kind so far; `place` is not run otherwise.
    pub fn offer(&self, margin: Margin, place: impl FnOnce(Margin) -> Margin) {
        let tighter = self
            .tightest
            .borrow()
            .iter()
            .find(|m| m.kind == margin.kind)
            .is_none_or(|kept| margin.tighter_than(kept));
        if tighter {
            self.record(place(margin));
        }
    }

    /// The tightest margin of each kind, tightest first.
    pub fn into_sorted(self) -> Vec<Margin> {
        let mut margins = self.tightest.into_inner();
        margins.sort_by(|a, b| {
            if a.tighter_than(b) {
                std::cmp::Ordering::Less
            } else if b.tighter_than(a) {
                std::cmp::Ordering::Greater
            } else {
                a.kind.cmp(&b.kind)
            }
        });
        margins
    }
}

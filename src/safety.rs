//! The safety cautions that apply to a plan, for the end of a report and the
//! diagram's footer. They do not replace local codes or qualified practice,
//! and the last caution says so.

use crate::model::{Class, Plan};

/// The cautions for this plan, most specific first; the closing line about
/// codes and qualified practice is always last.
pub fn cautions(plan: &Plan) -> Vec<&'static str> {
    let mut out = Vec::new();
    let lithium = plan
        .parts
        .iter()
        .any(|p| matches!(&p.class, Class::Battery(b) if b.chemistry.is_lithium()));
    let any_battery = plan
        .parts
        .iter()
        .any(|p| matches!(p.class, Class::Battery(_)));
    let motors = plan
        .parts
        .iter()
        .any(|p| matches!(p.class, Class::Motor(_)));
    if lithium {
        out.push(
            "Lithium batteries: charge only with a charger made for the chemistry and cell count, never unattended; do not use a swollen, punctured or over-discharged pack; store and charge in a fire-resistant container.",
        );
    }
    if any_battery {
        out.push(
            "Fuse at the battery: put the main fuse as close to the battery positive terminal as practical, so the wire between them is as short as it can be.",
        );
    }
    if motors {
        out.push(
            "Stalled motors turn all their power into heat in the winding and the driver: keep stalls short and give the robot an emergency stop that cuts motor power.",
        );
    }
    out.push(
        "Disconnect the battery before changing any wiring, and check polarity before connecting it again.",
    );
    out.push(
        "railcheck checks a plan, not a build: local electrical codes, the parts' own datasheets and qualified practice take precedence over anything it reports.",
    );
    out
}

//! Generated plans of a chosen size, for scale tests and benchmarks. Each
//! group of ten parts is one drive module of a larger machine: a 4S LiFePO4
//! pack behind a fuse, a buck feeding four sensors, and a motor driver with
//! two gearmotors. Every value is inside its part's ratings, so a generated
//! plan should check without errors at any size.

/// A plan with at least `parts` parts (rounded up to whole groups of ten).
pub fn plan(parts: usize) -> String {
    let mut text = String::from("railcheck: 1\nname: generated test bench\nparts:\n");
    let mut nets = String::new();
    let mut count = 0;
    let mut g = 0;
    while count < parts {
        text.push_str(&format!(
            "  pack{g}: {{ use: battery/lifepo4-4s }}\n  fuse{g}: {{ use: fuse/blade-10a }}\n  buck{g}: {{ use: regulator/buck-5v-3a }}\n  drv{g}: {{ use: driver/mosfet-dual-hbridge }}\n"
        ));
        let mut rail = vec![format!("buck{g}.vout"), format!("drv{g}.vlogic")];
        let mut ground = vec![
            format!("pack{g}.neg"),
            format!("buck{g}.gnd"),
            format!("drv{g}.gnd"),
        ];
        for s in 0..4 {
            text.push_str(&format!(
                "  s{g}_{s}: {{ class: sensor, pins: {{ vcc: {{ role: supply-in, range: 4.5 V..5.5 V, max: 6 V, draw: {{ typical: 20 mA, peak: 40 mA }} }}, gnd: {{ role: ground }} }} }}\n"
            ));
            rail.push(format!("s{g}_{s}.vcc"));
            ground.push(format!("s{g}_{s}.gnd"));
        }
        for (m, (a, b)) in [("out1a", "out1b"), ("out2a", "out2b")].iter().enumerate() {
            text.push_str(&format!("  m{g}_{m}: {{ use: motor/gearmotor-small }}\n"));
            nets.push_str(&format!("  M{g}_{m}A: [drv{g}.{a}, m{g}_{m}.a]\n"));
            nets.push_str(&format!("  M{g}_{m}B: [drv{g}.{b}, m{g}_{m}.b]\n"));
        }
        nets.push_str(&format!(
            "  BATT{g}: [pack{g}.pos, fuse{g}.a]\n  VSYS{g}: {{ pins: [fuse{g}.b, buck{g}.vin, drv{g}.vm], wire: 16 AWG, length: 0.5 m }}\n  R5V{g}: [{}]\n  GND{g}: {{ pins: [{}], wire: 16 AWG, length: 0.5 m }}\n",
            rail.join(", "),
            ground.join(", ")
        ));
        count += 10;
        g += 1;
    }
    text.push_str("nets:\n");
    text.push_str(&nets);
    text
}

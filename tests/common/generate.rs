//! Generated plans of a chosen size, for scale tests and benchmarks.
//!
//! Each power domain of 40 parts is one module of a larger machine, wired
//! the way a real rover is: a 3S pack behind a fuse and a plug, a latching
//! stop ahead of two dual motor drivers with four gearmotors, a 5 V buck for
//! the electronics, a computer with USB devices (a camera, a positioning
//! receiver and a microcontroller board it powers over the cable), encoders
//! brought to 3.3 V by level shifters, sensors on a pulled-up I2C bus, plain
//! 5 V sensors and a fan. Modes name the domain's parts, so a plan's modes
//! grow with it. Every value is inside its part's ratings, so a generated
//! plan checks without errors at any size.

/// Parts in one power domain.
pub const DOMAIN_PARTS: usize = 40;

const DOMAIN_PARTS_YAML: &str = "  pack_G: { use: battery/lipo-3s, with: { cutoff: true } }
  fuse_G: { use: fuse/blade-25a }
  plug_G: { use: connector/power-2pin-30a }
  stop_G: { use: switch/estop-20a }
  motor_fuse_G: { use: fuse/blade-15a }
  buck_G: { use: regulator/buck-5v-5a }
  fan_G: { use: load/fan-12v }
  front_G: { use: driver/mosfet-dual-hbridge }
  rear_G: { use: driver/mosfet-dual-hbridge }
  front_left_G: { use: motor/gearmotor-medium }
  front_right_G: { use: motor/gearmotor-medium }
  rear_left_G: { use: motor/gearmotor-medium }
  rear_right_G: { use: motor/gearmotor-medium }
  enc_fl_G: { use: sensor/encoder-hall-quadrature }
  enc_fr_G: { use: sensor/encoder-hall-quadrature }
  enc_rl_G: { use: sensor/encoder-hall-quadrature }
  enc_rr_G: { use: sensor/encoder-hall-quadrature }
  shift_front_G: { use: shifter/bidir-4ch }
  shift_rear_G: { use: shifter/bidir-4ch }
  ranger_G: { use: sensor/rangefinder-5v }
  shift_echo_G: { use: shifter/bidir-4ch }
  imu_G: { use: sensor/imu-3v3 }
  sda_up_G: { use: resistor/pullup-4k7 }
  scl_up_G: { use: resistor/pullup-4k7 }
  sbc_G: { use: board/sbc-5v }
  mcu_G:
    use: board/mcu-3v3
    pins:
      gpio1: { role: logic-out }
      gpio2: { role: logic-out }
      gpio3: { role: logic-out }
      gpio4: { role: logic-out }
      gpio5: { role: logic-out }
      gpio6: { role: logic-out }
      gpio7: { role: logic-out, ref: 3v3, family: lvcmos33 }
      gpio8: { role: logic-out, ref: 3v3, family: lvcmos33 }
      gpio9: { role: logic-out, ref: 3v3, family: lvcmos33 }
      gpio10: { role: logic-out, ref: 3v3, family: lvcmos33 }
      gpio11: { role: logic-out, ref: 3v3, family: lvcmos33 }
      gpio12: { role: logic-out, ref: 3v3, family: lvcmos33 }
      gpio13: { role: logic-in, ref: 3v3, family: lvcmos33 }
      gpio14: { role: logic-in, ref: 3v3, family: lvcmos33 }
      gpio15: { role: logic-in, ref: 3v3, family: lvcmos33 }
      gpio16: { role: logic-in, ref: 3v3, family: lvcmos33 }
      gpio17: { role: logic-in, ref: 3v3, family: lvcmos33 }
      gpio18: { role: logic-in, ref: 3v3, family: lvcmos33 }
      gpio19: { role: logic-in, ref: 3v3, family: lvcmos33 }
      gpio20: { role: logic-in, ref: 3v3, family: lvcmos33 }
      gpio21: { role: logic-out, ref: 3v3, family: lvcmos33 }
      gpio22: { role: logic-in, ref: 3v3, family: lvcmos33 }
      gpio23: { role: logic-in, ref: 3v3, family: lvcmos33 }
  camera_G:
    class: sensor
    pins: {}
    ports:
      usb: { kind: usb-device, draw: { idle: 100 mA, typical: 250 mA, peak: 450 mA } }
  gnss_G:
    class: sensor
    pins: {}
    ports:
      usb: { kind: usb-device, draw: { typical: 50 mA, peak: 150 mA } }
  temp_a_G: { class: sensor, pins: { vcc: { role: supply-in, range: 4.5 V..5.5 V, max: 6 V, draw: { typical: 20 mA, peak: 40 mA } }, gnd: { role: ground } } }
  temp_b_G: { class: sensor, pins: { vcc: { role: supply-in, range: 4.5 V..5.5 V, max: 6 V, draw: { typical: 20 mA, peak: 40 mA } }, gnd: { role: ground } } }
  gas_G: { class: sensor, pins: { vcc: { role: supply-in, range: 4.5 V..5.5 V, max: 6 V, draw: { typical: 35 mA, peak: 60 mA } }, gnd: { role: ground } } }
  light_G: { class: sensor, pins: { vcc: { role: supply-in, range: 4.5 V..5.5 V, max: 6 V, draw: { typical: 5 mA, peak: 10 mA } }, gnd: { role: ground } } }
  soil_G: { class: sensor, pins: { vcc: { role: supply-in, range: 4.5 V..5.5 V, max: 6 V, draw: { typical: 15 mA, peak: 30 mA } }, gnd: { role: ground } } }
  hum_G: { class: sensor, pins: { vcc: { role: supply-in, range: 4.5 V..5.5 V, max: 6 V, draw: { typical: 10 mA, peak: 20 mA } }, gnd: { role: ground } } }
  thermal_G:
    class: sensor
    pins: {}
    ports:
      usb: { kind: usb-device, draw: { idle: 80 mA, typical: 200 mA, peak: 450 mA } }
  aux_fan_G: { use: load/fan-12v }
  vent_G: { use: load/fan-12v }
  rain_G: { class: sensor, pins: { vcc: { role: supply-in, range: 4.5 V..5.5 V, max: 6 V, draw: { typical: 8 mA, peak: 15 mA } }, gnd: { role: ground } } }
  dust_G: { class: sensor, pins: { vcc: { role: supply-in, range: 4.5 V..5.5 V, max: 6 V, draw: { typical: 90 mA, peak: 120 mA } }, gnd: { role: ground } } }
  co2_G: { class: sensor, pins: { vcc: { role: supply-in, range: 4.5 V..5.5 V, max: 6 V, draw: { typical: 30 mA, peak: 150 mA } }, gnd: { role: ground } } }
  wind_G: { class: sensor, pins: { vcc: { role: supply-in, range: 4.5 V..5.5 V, max: 6 V, draw: { typical: 25 mA, peak: 50 mA } }, gnd: { role: ground } } }
";

const DOMAIN_NETS_YAML: &str = "  BATT_G: { pins: [pack_G.pos, fuse_G.a], wire: 12 AWG, length: 5 cm }
  LEAD_G: { pins: [fuse_G.b, plug_G.a1], wire: 12 AWG, length: 15 cm }
  BATTN_G: { pins: [pack_G.neg, plug_G.a2], wire: 12 AWG, length: 20 cm }
  VBAT_G: { pins: [plug_G.b1, stop_G.a, buck_G.vin, fan_G.vin, aux_fan_G.vin, vent_G.vin], wire: 12 AWG, length: 30 cm }
  VSTOP_G: { pins: [stop_G.b, motor_fuse_G.a, front_G.vm], wire: 12 AWG, length: 20 cm }
  VREAR_G: { pins: [motor_fuse_G.b, rear_G.vm], wire: 14 AWG, length: 40 cm }
  GND_G:
    pins: [plug_G.b2, front_G.gnd, rear_G.gnd, buck_G.gnd, fan_G.gnd, aux_fan_G.gnd, vent_G.gnd, sbc_G.gnd, mcu_G.gnd,
           imu_G.gnd, shift_front_G.gnd, shift_rear_G.gnd, shift_echo_G.gnd, enc_fl_G.gnd,
           enc_fr_G.gnd, enc_rl_G.gnd, enc_rr_G.gnd, ranger_G.gnd, temp_a_G.gnd, temp_b_G.gnd,
           gas_G.gnd, light_G.gnd, soil_G.gnd, hum_G.gnd, wind_G.gnd,
           rain_G.gnd, dust_G.gnd, co2_G.gnd]
    wire: 12 AWG
    length: 60 cm
  V5_G:
    pins: [buck_G.vout, sbc_G.vin, front_G.vlogic, rear_G.vlogic, shift_front_G.hv,
           shift_rear_G.hv, shift_echo_G.hv, enc_fl_G.vcc, enc_fr_G.vcc, enc_rl_G.vcc,
           enc_rr_G.vcc, ranger_G.vcc, temp_a_G.vcc, temp_b_G.vcc, gas_G.vcc, light_G.vcc,
           soil_G.vcc, hum_G.vcc, wind_G.vcc, rain_G.vcc, dust_G.vcc, co2_G.vcc]
    wire: 18 AWG
    length: 40 cm
  V3_G: [mcu_G.3v3, imu_G.vcc, shift_front_G.lv, shift_rear_G.lv, shift_echo_G.lv, sda_up_G.a, scl_up_G.a]
  FLA_G: { pins: [front_G.out1a, front_left_G.a], wire: 16 AWG, length: 50 cm }
  FLB_G: { pins: [front_G.out1b, front_left_G.b], wire: 16 AWG, length: 50 cm }
  FRA_G: { pins: [front_G.out2a, front_right_G.a], wire: 16 AWG, length: 50 cm }
  FRB_G: { pins: [front_G.out2b, front_right_G.b], wire: 16 AWG, length: 50 cm }
  RLA_G: { pins: [rear_G.out1a, rear_left_G.a], wire: 16 AWG, length: 50 cm }
  RLB_G: { pins: [rear_G.out1b, rear_left_G.b], wire: 16 AWG, length: 50 cm }
  RRA_G: { pins: [rear_G.out2a, rear_right_G.a], wire: 16 AWG, length: 50 cm }
  RRB_G: { pins: [rear_G.out2b, rear_right_G.b], wire: 16 AWG, length: 50 cm }
  F1_G: [mcu_G.gpio1, front_G.in1]
  F2_G: [mcu_G.gpio2, front_G.in2]
  F3_G: [mcu_G.gpio3, front_G.in3]
  F4_G: [mcu_G.gpio4, front_G.in4]
  FPL_G: [mcu_G.gpio5, front_G.ena]
  FPR_G: [mcu_G.gpio6, front_G.enb]
  R1_G: [mcu_G.gpio7, rear_G.in1]
  R2_G: [mcu_G.gpio8, rear_G.in2]
  R3_G: [mcu_G.gpio9, rear_G.in3]
  R4_G: [mcu_G.gpio10, rear_G.in4]
  RPL_G: [mcu_G.gpio11, rear_G.ena]
  RPR_G: [mcu_G.gpio12, rear_G.enb]
  EFLA_G: [enc_fl_G.a, shift_front_G.b1]
  EFLB_G: [enc_fl_G.b, shift_front_G.b2]
  EFRA_G: [enc_fr_G.a, shift_front_G.b3]
  EFRB_G: [enc_fr_G.b, shift_front_G.b4]
  ERLA_G: [enc_rl_G.a, shift_rear_G.b1]
  ERLB_G: [enc_rl_G.b, shift_rear_G.b2]
  ERRA_G: [enc_rr_G.a, shift_rear_G.b3]
  ERRB_G: [enc_rr_G.b, shift_rear_G.b4]
  EFLA3_G: [shift_front_G.a1, mcu_G.gpio13]
  EFLB3_G: [shift_front_G.a2, mcu_G.gpio14]
  EFRA3_G: [shift_front_G.a3, mcu_G.gpio15]
  EFRB3_G: [shift_front_G.a4, mcu_G.gpio16]
  ERLA3_G: [shift_rear_G.a1, mcu_G.gpio17]
  ERLB3_G: [shift_rear_G.a2, mcu_G.gpio18]
  ERRA3_G: [shift_rear_G.a3, mcu_G.gpio19]
  ERRB3_G: [shift_rear_G.a4, mcu_G.gpio20]
  TRIG_G: [mcu_G.gpio21, ranger_G.trig]
  ECHO_G: [ranger_G.echo, shift_echo_G.b1]
  ECHO3_G: [shift_echo_G.a1, mcu_G.gpio22]
  SDA_G: [mcu_G.sda, imu_G.sda, sda_up_G.b]
  SCL_G: [mcu_G.scl, imu_G.scl, scl_up_G.b]
  INT_G: [imu_G.int, mcu_G.gpio23]
";

const DOMAIN_LINKS_YAML: &str = "  - { usb: [sbc_G.usb1, mcu_G.usb], wire: 28 AWG, length: 0.5 m }
  - { usb: [sbc_G.usb2, camera_G.usb], wire: 28 AWG, length: 0.8 m }
  - { usb: [sbc_G.usb3, gnss_G.usb], wire: 28 AWG, length: 1 m }
  - { usb: [sbc_G.usb4, thermal_G.usb], wire: 28 AWG, length: 0.8 m }
";

/// Per mode: what it sets each named part of a domain to.
const MODES: [(&str, &str); 3] = [
    (
        "parked",
        "front_left_G: idle, front_right_G: idle, rear_left_G: idle, rear_right_G: idle, sbc_G: idle, camera_G: idle",
    ),
    (
        "cruise",
        "front_left_G: running, front_right_G: running, rear_left_G: running, rear_right_G: running, sbc_G: typical, camera_G: typical",
    ),
    (
        "climb",
        "front_left_G: stall, front_right_G: running, rear_left_G: stall, rear_right_G: running, sbc_G: typical, camera_G: peak",
    ),
];

/// A plan with at least `parts` parts, in whole domains of `DOMAIN_PARTS`.
pub fn plan(parts: usize) -> String {
    let domains = parts.div_ceil(DOMAIN_PARTS).max(1);
    let mut text =
        String::from("railcheck: 1\nname: generated field fleet\nambient: 30 degC\nparts:\n");
    let mut nets = String::from("nets:\n");
    let mut links = String::from("links:\n");
    let mut modes: Vec<String> = MODES
        .iter()
        .map(|(name, _)| format!("  {name}:\n"))
        .collect();
    for domain in 0..domains {
        let tag = domain.to_string();
        let with_tag = |template: &str| template.replace("_G", &format!("_{tag}"));
        text.push_str(&with_tag(DOMAIN_PARTS_YAML));
        nets.push_str(&with_tag(DOMAIN_NETS_YAML));
        links.push_str(&with_tag(DOMAIN_LINKS_YAML));
        for (mode, (_, states)) in modes.iter_mut().zip(MODES) {
            for entry in with_tag(states).split(", ") {
                mode.push_str(&format!("    {entry}\n"));
            }
        }
    }
    text.push_str(&nets);
    text.push_str(&links);
    text.push_str("modes:\n");
    for mode in modes {
        text.push_str(&mode);
    }
    text.push_str("profile: { parked: 30 %, cruise: 60 %, climb: 10 % }\n");
    text
}

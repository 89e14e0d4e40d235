//! The railcheck binary as the command-line tests run it: from the
//! project's root, so the examples' paths are relative to it, with colour
//! off.

use assert_cmd::Command;

pub fn railcheck() -> Command {
    let mut command = Command::cargo_bin("railcheck").expect("the railcheck binary is built");
    command
        .current_dir(env!("CARGO_MANIFEST_DIR"))
        .env("NO_COLOR", "1");
    command
}

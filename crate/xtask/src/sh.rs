//! Running other programs from the repository, each echoed first, failing with a message that
//! names the command.

use std::process::Command;

use crate::paths::{root, target_dir, TARGET_DIR_ENV};

/// Runs a command from the repository root, echoing it; fails with its description.
pub fn run(program: &str, args: &[&str]) -> Result<(), String> {
    run_in(".", program, args, &[])
}

/// Like [`run`], from a folder of the repository and with extra environment variables.
pub fn run_in(dir: &str, program: &str, args: &[&str], env: &[(&str, &str)]) -> Result<(), String> {
    let place = if dir == "." {
        String::new()
    } else {
        format!("(cd {dir}) ")
    };
    eprintln!("+ {place}{program} {}", args.join(" "));
    let status = Command::new(program)
        .args(args)
        .envs(env.iter().copied())
        .current_dir(root().join(dir))
        .status()
        .map_err(|e| format!("cannot start `{program}`: {e}"))?;
    if status.success() {
        Ok(())
    } else if dir == "." {
        Err(format!("`{program} {}` failed ({status})", args.join(" ")))
    } else {
        Err(format!(
            "`{program} {}` in {dir} failed ({status})",
            args.join(" ")
        ))
    }
}

/// Node, from a folder of the repository, told where the target folder is ([`TARGET_DIR_ENV`]).
pub fn node_in(dir: &str, args: &[&str]) -> Result<(), String> {
    let target = target_dir()?.display().to_string();
    run_in(dir, "node", args, &[(TARGET_DIR_ENV, &target)])
}

/// Like [`node_in`] from the repository root, but returns what it printed on standard output
/// (its standard error goes to ours).
pub fn node_output(args: &[&str]) -> Result<String, String> {
    let target = target_dir()?.display().to_string();
    let out = output_with("node", args, &[(TARGET_DIR_ENV, &target)])?;
    Ok(String::from_utf8_lossy(&out).into_owned())
}

/// Like [`run`], but returns what the program printed on standard output (its standard error
/// goes to ours).
pub fn output(program: &str, args: &[&str]) -> Result<Vec<u8>, String> {
    output_with(program, args, &[])
}

fn output_with(program: &str, args: &[&str], env: &[(&str, &str)]) -> Result<Vec<u8>, String> {
    eprintln!("+ {program} {}", args.join(" "));
    let out = Command::new(program)
        .args(args)
        .envs(env.iter().copied())
        .current_dir(root())
        .stderr(std::process::Stdio::inherit())
        .output()
        .map_err(|e| format!("cannot start `{program}`: {e}"))?;
    if !out.status.success() {
        return Err(format!(
            "`{program} {}` failed ({})",
            args.join(" "),
            out.status
        ));
    }
    Ok(out.stdout)
}

/// Whether `program arg` runs and succeeds (e.g. `ffprobe -version`).
pub fn works(program: &str, arg: &str) -> bool {
    Command::new(program)
        .arg(arg)
        .output()
        .is_ok_and(|o| o.status.success())
}

//! `batch --emit-slurm` under a real Slurm scheduler: a one-node cluster on this machine
//! (Debian's slurm-wlm and munge; controller and node daemons, the configuration in the target
//! folder), a manifest of simulated clips submitted as the emitted array and merge jobs, and the
//! merged counts compared with a one-machine batch. The Slurm daemons are stopped however it
//! ends; munge, started when it was not running, is left running.

use std::path::{Path, PathBuf};
use std::process::Command;
use std::time::{Duration, Instant};

use crate::builds::build_cli;
use crate::paths::target;
use crate::sh::{run, works};

/// Installs Slurm and munge when missing, starts the cluster, runs the check, stops the cluster.
pub fn check() -> Result<(), String> {
    if !works("sbatch", "--version") || !Path::new("/usr/sbin/munged").exists() {
        run("apt-get", &["install", "-y", "-qq", "slurm-wlm", "munge"])?;
    }
    build_cli()?;
    let cli = PathBuf::from(crate::paths::cli_binary()?);
    let dir = target("slurm-check")?;
    // Daemons left by a check that was killed would hold the ports.
    for pid in ["slurmd.pid", "slurmctld.pid"] {
        if let Ok(text) = std::fs::read_to_string(dir.join(pid)) {
            let _ = Command::new("kill").arg(text.trim()).status();
        }
    }
    let _ = std::fs::remove_dir_all(&dir);
    std::fs::create_dir_all(&dir).map_err(|e| format!("{}: {e}", dir.display()))?;
    start_munge()?;
    let cluster = Cluster::start(&dir)?;
    let result = submit_and_compare(&cli, &dir, &cluster);
    drop(cluster);
    result
}

/// The munge daemon (Slurm's authentication), with a key made once.
fn start_munge() -> Result<(), String> {
    let key = Path::new("/etc/munge/munge.key");
    if !key.exists() {
        run(
            "dd",
            &[
                "if=/dev/urandom",
                "of=/etc/munge/munge.key",
                "bs=1024",
                "count=1",
                "status=none",
            ],
        )?;
        run("chown", &["munge:munge", "/etc/munge/munge.key"])?;
        run("chmod", &["400", "/etc/munge/munge.key"])?;
    }
    if !works_quietly("sh", &["-c", "munge -n | unmunge"]) {
        let socket_dir = [
            "-d",
            "-o",
            "munge",
            "-g",
            "munge",
            "-m",
            "755",
            "/run/munge",
        ];
        run("install", &socket_dir)?;
        run(
            "runuser",
            &["-u", "munge", "--", "/usr/sbin/munged", "--force"],
        )?;
    }
    if works_quietly("sh", &["-c", "munge -n | unmunge"]) {
        Ok(())
    } else {
        Err("munge does not answer: Slurm cannot authenticate".into())
    }
}

fn works_quietly(program: &str, args: &[&str]) -> bool {
    Command::new(program)
        .args(args)
        .output()
        .is_ok_and(|o| o.status.success())
}

/// The controller and node daemons of a one-node cluster, stopped when dropped.
struct Cluster {
    conf: PathBuf,
    pids: Vec<PathBuf>,
}

impl Cluster {
    fn start(dir: &Path) -> Result<Cluster, String> {
        let host = output("hostname", &["-s"])?;
        let node = output("slurmd", &["-C"])?;
        let node = node.lines().next().unwrap_or_default().to_string();
        let d = dir.display();
        let conf = dir.join("slurm.conf");
        let text = format!(
            "ClusterName=throughline-check\nSlurmctldHost={host}\nAuthType=auth/munge\n\
             ProctrackType=proctrack/linuxproc\nTaskPlugin=task/none\nSlurmUser=root\n\
             StateSaveLocation={d}/state\nSlurmdSpoolDir={d}/spool\n\
             SlurmctldPidFile={d}/slurmctld.pid\nSlurmdPidFile={d}/slurmd.pid\n\
             SlurmctldLogFile={d}/slurmctld.log\nSlurmdLogFile={d}/slurmd.log\n\
             SelectType=select/cons_tres\nAccountingStorageType=accounting_storage/none\n\
             JobAcctGatherType=jobacct_gather/none\nMpiDefault=none\nReturnToService=2\n\
             {node} State=UNKNOWN\nPartitionName=check Nodes=ALL Default=YES MaxTime=INFINITE State=UP\n",
            host = host.trim(),
        );
        for sub in ["state", "spool"] {
            std::fs::create_dir_all(dir.join(sub)).map_err(|e| e.to_string())?;
        }
        std::fs::write(&conf, text).map_err(|e| format!("{}: {e}", conf.display()))?;
        let cluster = Cluster {
            conf: conf.clone(),
            pids: vec![dir.join("slurmd.pid"), dir.join("slurmctld.pid")],
        };
        cluster.slurm("slurmctld", &["-c"])?;
        cluster.slurm("slurmd", &[])?;
        let started = Instant::now();
        while !cluster
            .output("sinfo", &["-h", "-o", "%t"])?
            .contains("idle")
        {
            if started.elapsed() > Duration::from_secs(60) {
                return Err(format!(
                    "the one-node cluster did not come up in 60 s (logs in {d}/)"
                ));
            }
            std::thread::sleep(Duration::from_millis(500));
        }
        Ok(cluster)
    }

    fn command(&self, program: &str, args: &[&str]) -> Command {
        let mut c = Command::new(program);
        c.args(args).env("SLURM_CONF", &self.conf);
        c
    }

    fn slurm(&self, program: &str, args: &[&str]) -> Result<(), String> {
        eprintln!(
            "+ SLURM_CONF={} {program} {}",
            self.conf.display(),
            args.join(" ")
        );
        let status = self
            .command(program, args)
            .status()
            .map_err(|e| format!("cannot start {program}: {e}"))?;
        status
            .success()
            .then_some(())
            .ok_or(format!("{program} failed ({status})"))
    }

    fn output(&self, program: &str, args: &[&str]) -> Result<String, String> {
        let o = self
            .command(program, args)
            .output()
            .map_err(|e| format!("cannot start {program}: {e}"))?;
        Ok(String::from_utf8_lossy(&o.stdout).into_owned())
    }
}

impl Drop for Cluster {
    fn drop(&mut self) {
        for pid in &self.pids {
            if let Ok(text) = std::fs::read_to_string(pid) {
                let _ = Command::new("kill").arg(text.trim()).status();
            }
        }
    }
}

fn output(program: &str, args: &[&str]) -> Result<String, String> {
    let o = Command::new(program)
        .args(args)
        .output()
        .map_err(|e| format!("cannot start {program}: {e}"))?;
    Ok(String::from_utf8_lossy(&o.stdout).into_owned())
}

/// A manifest of three simulated clips of one site (two cameras, one in two consecutive clips).
fn three_clips(cli: &str, dir: &Path) -> Result<PathBuf, String> {
    for (name, seed) in [("north-1", "21"), ("north-2", "22"), ("south", "23")] {
        let out = dir.join(name).display().to_string();
        run(
            cli,
            &[
                "simulate",
                "--out-dir",
                &out,
                "--seed",
                seed,
                "--frames",
                "750",
            ],
        )?;
    }
    let plan = crate::paths::root().join("demo-site/demo/plan.json");
    std::fs::copy(&plan, dir.join("plan.json")).map_err(|e| e.to_string())?;
    let manifest = dir.join("manifest.csv");
    std::fs::write(
        &manifest,
        "name,detections,plan,site,camera,start\n\
         north-1,north-1/detections.txt,plan.json,Check Plaza,north,2026-03-02T07:00:00\n\
         north-2,north-2/detections.txt,plan.json,Check Plaza,north,2026-03-02T07:00:30\n\
         south,south/detections.txt,plan.json,Check Plaza,south,2026-03-02T07:00:00\n",
    )
    .map_err(|e| e.to_string())?;
    Ok(manifest)
}

/// Three simulated clips of one site (two cameras, one of them in two consecutive clips), the
/// emitted jobs submitted and waited for, and the merged counts compared with a batch run here.
fn submit_and_compare(cli: &Path, dir: &Path, cluster: &Cluster) -> Result<(), String> {
    let cli_s = cli.display().to_string();
    let manifest = three_clips(&cli_s, dir)?;
    let m = manifest.display().to_string();
    // A space in the path: the scripts must quote it.
    let on_cluster = dir.join("cluster out");
    let here = dir.join("here-out");
    run(
        &cli_s,
        &[
            "batch",
            &m,
            "--out",
            &on_cluster.display().to_string(),
            "--emit-slurm",
        ],
    )?;
    let submit = on_cluster.join("slurm/submit.sh").display().to_string();
    eprintln!("+ SLURM_CONF={} sh {submit}", cluster.conf.display());
    cluster.slurm("sh", &[&submit])?;
    let started = Instant::now();
    while !cluster.output("squeue", &["-h"])?.trim().is_empty() {
        if started.elapsed() > Duration::from_secs(300) {
            return Err("the jobs did not end in 5 minutes (squeue)".into());
        }
        std::thread::sleep(Duration::from_secs(1));
    }
    run(
        &cli_s,
        &["batch", &m, "--out", &here.display().to_string(), "--quiet"],
    )?;
    let name = "check-plaza_merged-counts.csv";
    let read = |p: PathBuf| std::fs::read(&p).map_err(|e| format!("{}: {e}", p.display()));
    let (a, b) = (read(on_cluster.join(name))?, read(here.join(name))?);
    let tasks = std::fs::read_dir(on_cluster.join("slurm"))
        .map_err(|e| e.to_string())?
        .filter_map(Result::ok)
        .filter(|e| e.file_name().to_string_lossy().starts_with("count-"))
        .count();
    if a != b {
        return Err(format!(
            "the merged counts from the cluster differ from the batch run here: {} and {}",
            on_cluster.join(name).display(),
            here.join(name).display()
        ));
    }
    if tasks != 3 {
        return Err(format!("{tasks} task logs where the array had 3 tasks"));
    }
    // The tasks did the counting: the merge job after them found every entry done.
    let table = String::from_utf8_lossy(&read(on_cluster.join("batch.csv"))?).into_owned();
    let skipped = table
        .lines()
        .skip(1)
        .filter(|l| l.contains(",skipped,"))
        .count();
    if skipped != 3 {
        return Err(format!(
            "the merge job found {skipped} of 3 entries done by the array tasks:\n{table}"
        ));
    }
    eprintln!("slurm: 3 array tasks and the merge job ran on a one-node cluster; merged counts equal the batch run here");
    Ok(())
}

//! The command line on the samples and on broken input.

use std::path::{Path, PathBuf};
use std::process::Command;

fn bin() -> Command {
    Command::new(env!("CARGO_BIN_EXE_tourwright"))
}

fn sample(name: &str) -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR"))
        .join("sample-missions")
        .join(name)
}

#[test]
fn eval_text_and_json() {
    let out = bin()
        .args(["eval"])
        .arg(sample("tern-saturn-ejs.tour.ron"))
        .output()
        .unwrap();
    assert!(out.status.success());
    let text = String::from_utf8(out.stdout).unwrap();
    assert!(text.contains("Swing-by") && text.contains("Jupiter") && text.contains("C3"));
    assert!(text.contains("Preliminary design"));
    let out = bin()
        .args(["eval", "--json"])
        .arg(sample("tern-saturn-ejs.tour.ron"))
        .output()
        .unwrap();
    assert!(out.status.success());
    let v: serde_json::Value = serde_json::from_slice(&out.stdout).unwrap();
    assert_eq!(v["stops"].as_array().unwrap().len(), 3);
    assert!(v["launch"]["c3_km2_s2"].as_f64().unwrap() > 0.0);
}

#[test]
fn compare_and_export() {
    let dir = tempfile::tempdir().unwrap();
    let out = bin()
        .args(["compare"])
        .arg(sample("wayfarer-belt-em.tour.ron"))
        .output()
        .unwrap();
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    let text = String::from_utf8(out.stdout).unwrap();
    assert!(
        text.contains("Direct vs assist") && text.contains("The tour "),
        "{text}"
    );
    let csv = dir.path().join("e.csv");
    let oem = dir.path().join("t.oem");
    let st = bin()
        .args(["export"])
        .arg(sample("lantern-jupiter-evej.tour.ron"))
        .arg("--csv")
        .arg(&csv)
        .arg("--oem")
        .arg(&oem)
        .status()
        .unwrap();
    assert!(st.success());
    assert!(
        std::fs::read_to_string(&csv)
            .unwrap()
            .starts_with("stop,kind,body")
    );
    assert!(
        std::fs::read_to_string(&oem)
            .unwrap()
            .starts_with("CCSDS_OEM_VERS = 2.0")
    );
}

#[test]
fn broken_input_fails_cleanly() {
    let dir = tempfile::tempdir().unwrap();
    let p = dir.path().join("broken.tour.ron");
    std::fs::write(
        &p,
        "(format: \"tourwright-design\",\n version: 1,\n name: \"x\"\n stops: [])",
    )
    .unwrap();
    let out = bin().arg("eval").arg(&p).output().unwrap();
    assert!(!out.status.success());
    let err = String::from_utf8(out.stderr).unwrap();
    assert_eq!(err.lines().count(), 1, "{err}");
    assert!(err.contains("broken.tour.ron:4:"), "{err}");
    let out = bin()
        .arg("eval")
        .arg(dir.path().join("missing.tour.ron"))
        .output()
        .unwrap();
    assert!(!out.status.success());
    let out = bin()
        .args([
            "window",
            "--from",
            "Earth",
            "--to",
            "Vulcan",
            "--depart",
            "2030-01-01..2030-06-01",
            "--tof",
            "100..300",
        ])
        .output()
        .unwrap();
    assert!(!out.status.success());
    assert!(String::from_utf8(out.stderr).unwrap().contains("Vulcan"));
}

#[test]
fn window_optimize_and_explore_commands() {
    let dir = tempfile::tempdir().unwrap();
    let csv = dir.path().join("w.csv");
    let out = bin()
        .args([
            "window",
            "--from",
            "Earth",
            "--to",
            "Mars",
            "--depart",
            "2033-01-01..2033-09-01",
            "--arrive",
            "2033-08-01..2034-08-01",
            "--steps",
            "40",
            "--csv",
        ])
        .arg(&csv)
        .output()
        .unwrap();
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    assert_eq!(
        std::fs::read_to_string(&csv).unwrap().lines().count(),
        40 * 40 + 1
    );
    let o = dir.path().join("o.tour.ron");
    let out = bin()
        .arg("optimize")
        .arg(sample("tern-saturn-ejs.tour.ron"))
        .args(["--evals", "4000", "--seed", "3", "--out"])
        .arg(&o)
        .output()
        .unwrap();
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    assert!(o.exists());
    let out = bin()
        .args([
            "explore",
            "--from",
            "E",
            "--to",
            "M",
            "--launch",
            "2033-01-01..2033-12-31",
            "--via",
            "V",
            "--max-swingbys",
            "1",
            "--max-tof-years",
            "3",
            "--evals",
            "3000",
            "--out",
        ])
        .arg(dir.path().join("x"))
        .output()
        .unwrap();
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    assert!(String::from_utf8(out.stdout).unwrap().contains("E-M"));
}

/// Run the binary, insist on success, return stdout.
fn run_ok(cmd: &mut Command) -> String {
    let out = cmd.output().unwrap();
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    String::from_utf8(out.stdout).unwrap()
}

#[test]
fn sharded_survey_merges_to_the_whole_ranking() {
    let dir = tempfile::tempdir().unwrap();
    let survey = [
        "explore",
        "--from",
        "E",
        "--to",
        "M",
        "--launch",
        "2033-01-01..2033-12-31",
        "--via",
        "V,E",
        "--max-swingbys",
        "2",
        "--max-tof-years",
        "3",
        "--evals",
        "2000",
    ];
    let whole = run_ok(bin().args(survey));
    let shards = dir.path().join("shards");
    std::fs::create_dir(&shards).unwrap();
    let mut lines = 0;
    for k in 1..=3 {
        let file = shards.join(format!("s{k}.jsonl"));
        run_ok(
            bin()
                .args(survey)
                .args(["--shard", &format!("{k}/3"), "--jsonl"])
                .arg(&file),
        );
        lines += std::fs::read_to_string(&file).unwrap().lines().count();
    }
    // E-M, E-V-M, E-E-M, and the four 2-swing-by sequences over V and E: 7 candidates split three
    // ways, plus one header line (counts and pruned sequences) per shard.
    assert_eq!(lines, 7 + 3);
    let merged = run_ok(
        bin()
            .args(["explore", "--merge"])
            .arg(&shards)
            .arg("--out")
            .arg(dir.path().join("ranked")),
    );
    assert_eq!(merged, whole, "merged shards rank as the whole survey");
    assert_eq!(
        std::fs::read_dir(dir.path().join("ranked"))
            .unwrap()
            .count(),
        7
    );
    // Bad shard specifications are refused with the reason.
    for bad in ["0/3", "4/3", "1/0", "x/3"] {
        let out = bin().args(survey).args(["--shard", bad]).output().unwrap();
        assert!(!out.status.success(), "--shard {bad} must fail");
        assert!(String::from_utf8_lossy(&out.stderr).contains("shard"));
    }
}

#[test]
fn ephemeris_model_is_chosen_per_command() {
    let file = Path::new(env!("CARGO_MANIFEST_DIR")).join("benches/mga/cassini1.tour.ron");
    let launch_vinf = |model: &str| {
        let text = run_ok(
            bin()
                .arg("eval")
                .arg(&file)
                .args(["--json", "--ephemeris", model]),
        );
        let v: serde_json::Value = serde_json::from_str(&text).unwrap();
        v["launch"]["vinf_km_s"].as_f64().unwrap()
    };
    let mga = launch_vinf("mga-benchmark");
    let mean = launch_vinf("mean-elements");
    assert!(mga.is_finite() && mean.is_finite());
    assert!(
        (mga - mean).abs() > 1e-3,
        "the two models give different states"
    );
    let help = run_ok(bin().args(["optimize", "--help"]));
    assert!(help.contains("mean-elements") && help.contains("mga-benchmark"));
    let out = bin()
        .arg("eval")
        .arg(&file)
        .args(["--ephemeris", "de999"])
        .output()
        .unwrap();
    assert!(!out.status.success());
    assert!(String::from_utf8_lossy(&out.stderr).contains("mga-benchmark"));
}

#[test]
fn state_prints_and_writes_planet_states_from_each_source() {
    // One epoch: J2000 Earth-Moon barycentre from the mean elements, near 1 AU (0.983 AU early in
    // January: perihelion; common practice).
    let state = |args: &[&str]| -> Vec<f64> {
        let out = bin().args(args).arg("--json").output().unwrap();
        assert!(
            out.status.success(),
            "{}",
            String::from_utf8_lossy(&out.stderr)
        );
        let v: serde_json::Value = serde_json::from_slice(&out.stdout).unwrap();
        let s = &v["states"][0];
        ["x_km", "y_km", "z_km"]
            .iter()
            .map(|k| s[k].as_f64().unwrap())
            .collect()
    };
    let f = state(&["state", "Earth", "--at", "2000-01-01T12:00:00 TDB"]);
    let r_au = (f[0] * f[0] + f[1] * f[1] + f[2] * f[2]).sqrt() / 149_597_870.7;
    assert!((r_au - 0.9833).abs() < 0.001, "{r_au}");
    // A range with a step, to CSV, in the benchmark model.
    let dir = tempfile::tempdir().unwrap();
    let csv = dir.path().join("mars.csv");
    let out = bin()
        .args([
            "state",
            "Mars",
            "--at",
            "2030-01-01..2030-12-31",
            "--step",
            "30",
            "--ephemeris",
            "mga-benchmark",
            "--csv",
        ])
        .arg(&csv)
        .output()
        .unwrap();
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    // Any CSV reader takes it: a header, then one record per state.
    let mut r = csv::Reader::from_path(&csv).unwrap();
    assert_eq!(
        r.headers().unwrap().iter().collect::<Vec<_>>(),
        [
            "epoch_tdb",
            "body",
            "x_km",
            "y_km",
            "z_km",
            "vx_km_s",
            "vy_km_s",
            "vz_km_s"
        ]
    );
    let records: Vec<csv::StringRecord> = r.records().map(|x| x.unwrap()).collect();
    assert_eq!(records.len(), 13);
    assert!(records[0][2].parse::<f64>().is_ok());
    // A kernel that is not there: a clear error naming it.
    let out = bin()
        .args(["state", "Mars", "--at", "2030-01-01", "--ephemeris"])
        .arg(format!(
            "kernel:{}",
            dir.path().join("missing.bsp").display()
        ))
        .output()
        .unwrap();
    assert!(!out.status.success());
    let err = String::from_utf8(out.stderr).unwrap();
    assert!(err.contains("missing.bsp"), "{err}");
    // With DE421 (CI): Mars from the kernel and from the mean elements agree to the table's
    // accuracy (well under 0.001 AU at 2030).
    if let Some(k) = std::env::var_os("TOURWRIGHT_DE421") {
        let pick = |eph: &str| state(&["state", "Mars", "--at", "2030-01-01", "--ephemeris", eph]);
        let a = pick(&format!("kernel:{}", k.to_string_lossy()));
        let b = pick("mean-elements");
        let d = ((a[0] - b[0]).powi(2) + (a[1] - b[1]).powi(2) + (a[2] - b[2]).powi(2)).sqrt();
        assert!(d < 0.001 * 149_597_870.7, "{d} km");
    }
}

#[test]
fn fidelity_reports_every_encounter_in_text_and_json() {
    let out = bin()
        .args(["fidelity"])
        .arg(sample("tern-saturn-ejs.tour.ron"))
        .output()
        .unwrap();
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    let text = String::from_utf8(out.stdout).unwrap();
    assert!(text.contains("B·T") && text.contains("Saturn") && text.contains("Preliminary"));
    let out = bin()
        .args(["fidelity", "--json"])
        .arg(sample("tern-saturn-ejs.tour.ron"))
        .output()
        .unwrap();
    assert!(out.status.success());
    let v: serde_json::Value = serde_json::from_slice(&out.stdout).unwrap();
    let enc = v["encounters"].as_array().unwrap();
    assert_eq!(enc.len(), 2);
    for c in enc {
        assert!(c["miss_km"].as_f64().unwrap().is_finite());
        assert!(c["correction_dv_km_s"].as_f64().is_some(), "{c}");
    }
}

#[test]
fn optimize_says_plainly_when_no_design_meets_the_limits() {
    // Earth to Jupiter direct needs C3 near 80 km²/s² (common practice): with at most 5 the
    // search must say that nothing meets every limit, name the limit, and exit with status 3.
    let dir = tempfile::tempdir().unwrap();
    let f = dir.path().join("ej.tour.ron");
    std::fs::write(
        &f,
        r#"(format: "tourwright-design", version: 1, name: "E-J at C3 5",
            stops: [(body: "Earth", epoch: "2031-06-01"), (body: "Jupiter", epoch: "2034-01-01")],
            launch: (max_c3_km2_s2: Some(5.0)))"#,
    )
    .unwrap();
    let out_file = dir.path().join("closest.tour.ron");
    let out = bin()
        .args(["optimize", "--evals", "20000", "--out"])
        .arg(&out_file)
        .arg(&f)
        .output()
        .unwrap();
    assert_eq!(
        out.status.code(),
        Some(3),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    let text = String::from_utf8(out.stdout).unwrap();
    let first = text.lines().next().unwrap();
    assert!(
        first.starts_with("No design meeting every limit was found"),
        "{text}"
    );
    assert!(
        text.contains("launch C3") && text.contains("(by "),
        "{text}"
    );
    assert!(text.contains("start:  launch v∞ + spacecraft Δv") && text.contains("km/s"));
    // The closest design is still written, and says so in its notes.
    let d = tourwright::mission::files::load(&out_file).unwrap();
    assert!(d.notes.contains("no design meeting every limit"));
}

#[test]
fn optimize_reports_the_designs_own_objective_and_never_writes_over_its_input() {
    let dir = tempfile::tempdir().unwrap();
    let f = dir.path().join("tern.tour.ron");
    std::fs::copy(sample("tern-saturn-ejs.tour.ron"), &f).unwrap();
    let before = std::fs::read(&f).unwrap();
    // --out naming the input is refused (and the file stays as it was).
    let out = bin()
        .args(["optimize", "--evals", "5000", "--out"])
        .arg(&f)
        .arg(&f)
        .output()
        .unwrap();
    assert_eq!(out.status.code(), Some(1));
    assert!(String::from_utf8_lossy(&out.stderr).contains("--in-place"));
    assert_eq!(std::fs::read(&f).unwrap(), before);
    // The start the CLI prints is the design's objective as eval computes it.
    let eval = bin().args(["eval", "--json"]).arg(&f).output().unwrap();
    let v: serde_json::Value = serde_json::from_slice(&eval.stdout).unwrap();
    let objective =
        v["launch"]["vinf_km_s"].as_f64().unwrap() + v["ledger"]["total_dv_km_s"].as_f64().unwrap();
    let out = bin()
        .args(["optimize", "--evals", "20000", "--in-place", "--out"])
        .arg(&f)
        .arg(&f)
        .output()
        .unwrap();
    assert!(out.status.success());
    let text = String::from_utf8(out.stdout).unwrap();
    let start = text.lines().find(|l| l.starts_with("start:")).unwrap();
    assert!(
        start.contains(&format!("{objective:.4} km/s")),
        "{start} vs {objective}"
    );
    let result = text.lines().find(|l| l.starts_with("result:")).unwrap();
    assert!(result.contains("meets every limit"), "{result}");
}

/// A copy of a sample in a temporary folder.
fn copy_of(name: &str, dir: &Path) -> PathBuf {
    let p = dir.join(name);
    std::fs::copy(sample(name), &p).unwrap();
    p
}

#[test]
fn no_command_writes_over_its_input_or_a_design_file() {
    let dir = tempfile::tempdir().unwrap();
    let f = copy_of("lantern-jupiter-evej.tour.ron", dir.path());
    let other = copy_of("tern-saturn-ejs.tour.ron", dir.path());
    let before = std::fs::read(&f).unwrap();
    let other_before = std::fs::read(&other).unwrap();
    let refused = |args: Vec<&std::ffi::OsStr>| {
        let out = bin().args(args).output().unwrap();
        assert_eq!(
            out.status.code(),
            Some(1),
            "{}",
            String::from_utf8_lossy(&out.stdout)
        );
        String::from_utf8(out.stderr).unwrap()
    };
    let (fa, oa) = (f.as_os_str(), other.as_os_str());
    // Exports over the input, or over another design file.
    for flag in ["--csv", "--ledger", "--samples", "--oem"] {
        let e = refused(vec!["export".as_ref(), fa, flag.as_ref(), fa]);
        assert!(e.contains("never replaces"), "{e}");
        let e = refused(vec!["export".as_ref(), fa, flag.as_ref(), oa]);
        assert!(e.contains("holds a design"), "{e}");
    }
    // The optimiser's front, a window map's CSV.
    let e = refused(vec![
        "optimize".as_ref(),
        fa,
        "--evals".as_ref(),
        "1000".as_ref(),
        "--out".as_ref(),
        dir.path().join("x.tour.ron").as_os_str(),
        "--front".as_ref(),
        fa,
    ]);
    assert!(e.contains("--front"), "{e}");
    let e = refused(vec![
        "window".as_ref(),
        "--design".as_ref(),
        fa,
        "--steps".as_ref(),
        "10".as_ref(),
        "--csv".as_ref(),
        fa,
    ]);
    assert!(e.contains("--csv"), "{e}");
    // Design outputs over the input need --in-place.
    for cmd in [
        vec!["retarget", "--stop", "2"],
        vec!["dsm", "--leg", "2", "--at", "0.5"],
        vec!["optimize", "--evals", "1000"],
    ] {
        let mut args: Vec<&std::ffi::OsStr> = vec![cmd[0].as_ref(), fa];
        args.extend(cmd[1..].iter().map(|s| -> &std::ffi::OsStr { s.as_ref() }));
        args.extend(["--out".as_ref(), fa]);
        let e = refused(args);
        assert!(e.contains("--in-place"), "{e}");
    }
    assert_eq!(std::fs::read(&f).unwrap(), before);
    assert_eq!(std::fs::read(&other).unwrap(), other_before);
    // With --in-place the design is replaced, and still loads.
    let out = bin()
        .args(["dsm"])
        .arg(&f)
        .args(["--leg", "3", "--at", "0.4", "--in-place", "--out"])
        .arg(&f)
        .output()
        .unwrap();
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    assert_ne!(std::fs::read(&f).unwrap(), before);
    tourwright::mission::files::load(&f).unwrap();
}

#[cfg(unix)]
#[test]
fn saves_write_through_links_and_refuse_special_files() {
    let dir = tempfile::tempdir().unwrap();
    let target = copy_of("lantern-jupiter-evej.tour.ron", dir.path());
    let link = dir.path().join("link.tour.ron");
    std::os::unix::fs::symlink(&target, &link).unwrap();
    let src = dir.path().join("src.tour.ron");
    std::fs::copy(sample("lantern-jupiter-evej.tour.ron"), &src).unwrap();
    let out = bin()
        .arg("dsm")
        .arg(&src)
        .args(["--leg", "3", "--at", "0.3", "--out"])
        .arg(&link)
        .output()
        .unwrap();
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    // Still a link; its target holds the new design.
    assert!(
        std::fs::symlink_metadata(&link)
            .unwrap()
            .file_type()
            .is_symlink()
    );
    let d = tourwright::mission::files::load(&target).unwrap();
    assert!(matches!(
        d.legs[2].dsm.unwrap().at,
        tourwright::mission::design::DsmTime::Fraction(f) if (f - 0.3).abs() < 1e-12
    ));
    // No temporary file is left behind.
    let left: Vec<_> = std::fs::read_dir(dir.path())
        .unwrap()
        .map(|e| e.unwrap().file_name().to_string_lossy().to_string())
        .filter(|n| n.ends_with(".tmp"))
        .collect();
    assert!(left.is_empty(), "{left:?}");
    // A device is not a design file: refused, and left as it was.
    let out = bin()
        .arg("dsm")
        .arg(&src)
        .args(["--leg", "3", "--at", "0.3", "--out", "/dev/null"])
        .output()
        .unwrap();
    assert_eq!(out.status.code(), Some(1));
    assert!(String::from_utf8_lossy(&out.stderr).contains("not a regular file"));
    let m = std::fs::metadata("/dev/null").unwrap();
    assert!(!m.is_file());
}

#[test]
fn a_dash_reads_standard_input_and_writes_standard_output() {
    use std::io::Write as _;
    use std::process::Stdio;
    let text = std::fs::read_to_string(sample("tern-saturn-ejs.tour.ron")).unwrap();
    let mut child = bin()
        .args(["eval", "-", "--json"])
        .stdin(Stdio::piped())
        .stdout(Stdio::piped())
        .spawn()
        .unwrap();
    child
        .stdin
        .take()
        .unwrap()
        .write_all(text.as_bytes())
        .unwrap();
    let out = child.wait_with_output().unwrap();
    assert!(out.status.success());
    let v: serde_json::Value = serde_json::from_slice(&out.stdout).unwrap();
    assert_eq!(v["sequence"], "E-J-S");
    // An export to standard output is the CSV alone.
    let out = bin()
        .arg("export")
        .arg(sample("tern-saturn-ejs.tour.ron"))
        .args(["--ledger", "-"])
        .output()
        .unwrap();
    assert!(out.status.success());
    let mut r = csv::Reader::from_reader(&out.stdout[..]);
    assert_eq!(r.headers().unwrap().get(0), Some("item"));
    assert!(r.records().count() >= 3);
    // A design in, a design out: the words go to standard error, the design to standard output.
    let mut child = bin()
        .args(["dsm", "-", "--leg", "2", "--at", "0.5", "--out", "-"])
        .stdin(Stdio::piped())
        .stdout(Stdio::piped())
        .stderr(Stdio::piped())
        .spawn()
        .unwrap();
    child
        .stdin
        .take()
        .unwrap()
        .write_all(text.as_bytes())
        .unwrap();
    let out = child.wait_with_output().unwrap();
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    let d = tourwright::mission::files::from_str(
        &String::from_utf8(out.stdout).unwrap(),
        Path::new("stdout"),
    )
    .unwrap();
    assert!(d.legs[1].dsm.is_some());
    assert!(String::from_utf8_lossy(&out.stderr).contains("Ledger"));
}

#[test]
fn json_of_every_command_parses_back() {
    let dir = tempfile::tempdir().unwrap();
    let tern = sample("tern-saturn-ejs.tour.ron");
    let lantern = sample("lantern-jupiter-evej.tour.ron");
    let o = |n: &str| dir.path().join(n).to_string_lossy().to_string();
    let cases: Vec<(Vec<String>, &str)> = vec![
        (vec!["eval".into(), tern.to_string_lossy().into()], "stops"),
        (
            vec![
                "state".into(),
                "Mars".into(),
                "--at".into(),
                "2030-01-01".into(),
            ],
            "states",
        ),
        (
            vec![
                "tisserand".into(),
                "--bodies".into(),
                "V,E".into(),
                "--vinf".into(),
                "3".into(),
            ],
            "contours",
        ),
        (
            vec!["fidelity".into(), tern.to_string_lossy().into()],
            "encounters",
        ),
        (
            vec![
                "compare".into(),
                tern.to_string_lossy().into(),
                "--window-days".into(),
                "30".into(),
            ],
            "summary",
        ),
        (
            vec![
                "window".into(),
                "--from".into(),
                "E".into(),
                "--to".into(),
                "M".into(),
                "--depart".into(),
                "2033-01-01..2033-06-01".into(),
                "--tof".into(),
                "150..350".into(),
                "--steps".into(),
                "20".into(),
            ],
            "minima",
        ),
        (
            vec![
                "retarget".into(),
                lantern.to_string_lossy().into(),
                "--stop".into(),
                "2".into(),
                "--out".into(),
                o("r.tour.ron"),
            ],
            "miss_km",
        ),
        (
            vec![
                "dsm".into(),
                tern.to_string_lossy().into(),
                "--leg".into(),
                "2".into(),
                "--at".into(),
                "0.5".into(),
                "--out".into(),
                o("d.tour.ron"),
            ],
            "dsms",
        ),
        (
            vec![
                "optimize".into(),
                tern.to_string_lossy().into(),
                "--evals".into(),
                "5000".into(),
                "--out".into(),
                o("o.tour.ron"),
            ],
            "result",
        ),
        (
            vec![
                "explore".into(),
                "--from".into(),
                "E".into(),
                "--to".into(),
                "M".into(),
                "--launch".into(),
                "2033-01-01..2033-12-31".into(),
                "--via".into(),
                "V".into(),
                "--max-swingbys".into(),
                "1".into(),
                "--evals".into(),
                "3000".into(),
            ],
            "ranked",
        ),
        (
            vec![
                "period".into(),
                lantern.to_string_lossy().into(),
                "--days".into(),
                "1".into(),
                "--evals-per-day".into(),
                "2000".into(),
            ],
            "summary",
        ),
    ];
    for (args, key) in cases {
        let out = bin().args(&args).arg("--json").output().unwrap();
        assert!(
            out.status.success(),
            "{args:?}: {}",
            String::from_utf8_lossy(&out.stderr)
        );
        let v: serde_json::Value = serde_json::from_slice(&out.stdout)
            .unwrap_or_else(|e| panic!("{args:?}: {e}: {}", String::from_utf8_lossy(&out.stdout)));
        assert!(!v[key].is_null(), "{args:?}: no {key}");
    }
}

#[cfg(unix)]
#[test]
fn ctrl_c_stops_the_optimiser_and_keeps_the_best_design() {
    let dir = tempfile::tempdir().unwrap();
    let out_file = dir.path().join("best.tour.ron");
    let child = bin()
        .arg("optimize")
        .arg(sample("lantern-jupiter-evej.tour.ron"))
        .args(["--evals", "500000000", "--out"])
        .arg(&out_file)
        .stdout(std::process::Stdio::piped())
        .spawn()
        .unwrap();
    std::thread::sleep(std::time::Duration::from_millis(1500));
    let st = Command::new("kill")
        .args(["-INT", &child.id().to_string()])
        .status()
        .unwrap();
    assert!(st.success());
    let out = child.wait_with_output().unwrap();
    assert_eq!(out.status.code(), Some(130));
    let text = String::from_utf8(out.stdout).unwrap();
    assert!(text.contains("interrupted"), "{text}");
    // The best design so far was written, loads, and meets every limit (the sample does).
    let d = tourwright::mission::files::load(&out_file).unwrap();
    let (_, e) = tourwright::mission::evaluate_design(&d);
    assert!(!e.violates_limits(), "{:?}", e.warnings);
}

#[test]
fn clap_checks_conflicts_and_writes_completions_and_a_manual() {
    let out = bin()
        .args([
            "window",
            "--from",
            "E",
            "--to",
            "M",
            "--depart",
            "2033-01-01..2033-06-01",
            "--arrive",
            "2033-08-01..2034-01-01",
            "--tof",
            "100..300",
        ])
        .output()
        .unwrap();
    assert_eq!(out.status.code(), Some(2));
    assert!(String::from_utf8_lossy(&out.stderr).contains("cannot be used with"));
    let out = bin().args(["completions", "bash"]).output().unwrap();
    assert!(out.status.success());
    assert!(String::from_utf8_lossy(&out.stdout).contains("tourwright"));
    let out = bin().args(["manual"]).output().unwrap();
    assert!(out.status.success());
    let man = String::from_utf8(out.stdout).unwrap();
    assert!(
        man.starts_with(".ie") || man.contains(".TH"),
        "{}",
        &man[..200.min(man.len())]
    );
    let dir = tempfile::tempdir().unwrap();
    let out = bin()
        .args(["manual", "--out"])
        .arg(dir.path())
        .output()
        .unwrap();
    assert!(out.status.success());
    assert!(dir.path().join("tourwright-optimize.1").exists());
}

#[test]
fn a_leg_shorter_than_an_hour_is_refused_with_its_field() {
    // Two stops under a second apart, written in different time scales (TDB − UTC is about
    // 69.2 s in 2031: 37 s of leap seconds and 32.184 s; IERS, common practice).
    let dir = tempfile::tempdir().unwrap();
    let f = dir.path().join("zero.tour.ron");
    std::fs::write(
        &f,
        r#"(format: "tourwright-design", version: 1, name: "zero",
            stops: [(body: "Earth", epoch: "2031-06-01T00:00:00.000 UTC"),
                    (body: "Mars", epoch: "2031-06-01T00:01:10.000 TDB")])"#,
    )
    .unwrap();
    let out = bin().arg("eval").arg(&f).output().unwrap();
    assert_eq!(out.status.code(), Some(1));
    let e = String::from_utf8(out.stderr).unwrap();
    assert!(
        e.contains("stops[1].epoch") && e.contains("at least an hour"),
        "{e}"
    );
}

#[test]
fn a_parse_error_points_at_the_bad_token() {
    // A field name mistyped at the start of a line, after a complete one: the message names
    // that line and column, not the end of the line before.
    let dir = tempfile::tempdir().unwrap();
    let f = dir.path().join("bad.tour.ron");
    let text = std::fs::read_to_string(sample("tern-saturn-ejs.tour.ron"))
        .unwrap()
        .replace("        min_dla_deg: None,", "        min_dla_deg: Nnoe,");
    std::fs::write(&f, &text).unwrap();
    let line = text.lines().position(|l| l.contains("Nnoe")).unwrap() + 1;
    let out = bin().arg("eval").arg(&f).output().unwrap();
    let e = String::from_utf8(out.stderr).unwrap();
    assert!(
        e.contains(&format!("bad.tour.ron:{line}:")),
        "{e} (line {line})"
    );
    // A huge token is not echoed whole.
    let big = text.replace("Nnoe", &"N".repeat(40_000));
    std::fs::write(&f, big).unwrap();
    let out = bin().arg("eval").arg(&f).output().unwrap();
    assert!(out.stderr.len() < 500, "{} bytes", out.stderr.len());
}

#[test]
fn continuous_fidelity_reports_the_model_and_writes_an_oem_per_coast_arc() {
    let dir = tempfile::tempdir().unwrap();
    let oem = dir.path().join("lantern.oem");
    let out = bin()
        .args(["fidelity", "--continuous", "--json", "--quiet", "--oem"])
        .arg(&oem)
        .arg(sample("lantern-jupiter-evej.tour.ron"))
        .output()
        .unwrap();
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    let v: serde_json::Value = serde_json::from_slice(&out.stdout).unwrap();
    assert_eq!(v["converged"], true);
    assert!(v["max_position_gap_km"].as_f64().unwrap() <= 1.0);
    let bodies = v["model"]["bodies"].as_array().unwrap();
    assert!(bodies.iter().any(|b| b["name"] == "Jupiter"));
    assert!(v["model"]["gm_set"].as_str().unwrap().contains("DE440"));
    assert_eq!(v["encounters"].as_array().unwrap().len(), 4);
    // Lantern's impulses: the manoeuvre of leg 3 and the capture at Jupiter.
    assert_eq!(v["impulses"].as_array().unwrap().len(), 2);
    // One OEM segment per coast arc: launch to the manoeuvre, the manoeuvre to arrival.
    let text = std::fs::read_to_string(&oem).unwrap();
    assert_eq!(text.matches("META_START").count(), 2, "{}", &text[..400]);
    assert!(text.contains("Force model") && text.contains("REF_FRAME = EME2000"));
    // --oem without --continuous is refused by clap; a design file is never overwritten.
    let st = bin()
        .args(["fidelity", "--oem"])
        .arg(&oem)
        .arg(sample("lantern-jupiter-evej.tour.ron"))
        .output()
        .unwrap();
    assert_eq!(st.status.code(), Some(2));
    assert!(String::from_utf8_lossy(&st.stderr).contains("--continuous"));
}

#[test]
fn continuous_fidelity_says_where_it_does_not_converge_with_exit_status_3() {
    let out =
        bin()
            .args(["fidelity", "--continuous", "--quiet"])
            .arg(std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join(
                "crates/tourwright-mission/tests/fixtures/ember-hidden-venus-encounter.tour.ron",
            ))
            .output()
            .unwrap();
    assert_eq!(out.status.code(), Some(3));
    let text = String::from_utf8(out.stdout).unwrap();
    assert!(
        text.contains("Not converged") && text.contains("Venus to Venus"),
        "{text}"
    );
}

/// The converged trajectory on DE421 re-integrated by an independent implementation (scipy's
/// DOP853, jplephem reading the same kernel, the GM values from the JSON): every checked day
/// agrees to 1 km. Runs where TOURWRIGHT_DE421 is set and Python has numpy, scipy and jplephem
/// (CI installs them, versions pinned in `.ci/run`); TOURWRIGHT_REQUIRE_PYTHON makes their
/// absence a failure.
#[test]
fn the_continuous_trajectory_agrees_with_an_independent_integration() {
    let Some(k) = std::env::var_os("TOURWRIGHT_DE421") else {
        eprintln!("SKIPPED: TOURWRIGHT_DE421 not set");
        return;
    };
    let has_python = Command::new("python3")
        .args(["-c", "import numpy, scipy, jplephem"])
        .status()
        .is_ok_and(|s| s.success());
    if !has_python {
        assert!(
            std::env::var_os("TOURWRIGHT_REQUIRE_PYTHON").is_none(),
            "python3 with numpy, scipy and jplephem is required here"
        );
        eprintln!("SKIPPED: python3 with numpy, scipy and jplephem not found");
        return;
    }
    let dir = tempfile::tempdir().unwrap();
    let oem = dir.path().join("run.oem");
    let out = bin()
        .args([
            "fidelity",
            "--continuous",
            "--json",
            "--quiet",
            "--ephemeris",
        ])
        .arg(format!("kernel:{}", k.to_string_lossy()))
        .arg("--oem")
        .arg(&oem)
        .arg(sample("lantern-jupiter-evej.tour.ron"))
        .output()
        .unwrap();
    assert!(out.status.success());
    let json = dir.path().join("run.json");
    std::fs::write(&json, &out.stdout).unwrap();
    let script =
        std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("tests/scripts/verify_continuous.py");
    let v = Command::new("python3")
        .arg(script)
        .arg(&json)
        .arg(&oem)
        .arg(&k)
        .args(["--tol-km", "1.0", "--every", "10"])
        .output()
        .unwrap();
    let said = String::from_utf8_lossy(&v.stdout);
    assert!(
        v.status.success(),
        "{said}{}",
        String::from_utf8_lossy(&v.stderr)
    );
    assert!(said.contains("OK"), "{said}");
}

fn insight_period() -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR"))
        .join("crates/tourwright-search/tests/fixtures/insight-2018-launch-period.tour.ron")
}

#[test]
fn period_prints_json_and_csv_and_writes_a_days_design_that_eval_agrees_with() {
    let dir = tempfile::tempdir().unwrap();
    let lantern = copy_of("lantern-jupiter-evej.tour.ron", dir.path());
    let csv = dir.path().join("period.csv");
    let day = dir.path().join("day.tour.ron");
    let days = dir.path().join("days");
    let text = run_ok(
        bin()
            .arg("period")
            .arg(&lantern)
            .args([
                "--days",
                "3",
                "--step",
                "2",
                "--evals-per-day",
                "20000",
                "--json",
            ])
            .arg("--csv")
            .arg(&csv)
            .args(["--day", "-1", "--out"])
            .arg(&day)
            .arg("--out-dir")
            .arg(&days),
    );
    let v: serde_json::Value = serde_json::from_str(&text).unwrap();
    for key in [
        "name",
        "days_requested",
        "step_days",
        "fixed_arrival",
        "evals_per_day",
        "seed",
        "centre_utc",
        "arrival_held_utc",
        "cancelled",
        "evaluations",
        "every_day_meets_every_limit",
        "summary",
        "days",
        "lines",
    ] {
        assert!(v.get(key).is_some(), "{key} missing: {text}");
    }
    assert_eq!(v["days_requested"], 3);
    assert_eq!(v["step_days"], 2.0);
    let s = &v["summary"];
    for key in [
        "largest_c3_km2_s2",
        "largest_dv_km_s",
        "dla_min_deg",
        "dla_max_deg",
        "days_breaking_limits",
        "days_with_family_jumps",
        "propellant_margin_kg",
        "dv_margin_km_s",
        "lv_margin_at_largest_c3_kg",
    ] {
        assert!(s.get(key).is_some(), "summary.{key} missing");
    }
    let rows = v["days"].as_array().unwrap();
    assert_eq!(rows.len(), 3);
    assert_eq!(rows[0]["day"], -1);
    for key in [
        "launch_utc",
        "c3_km2_s2",
        "vinf_km_s",
        "dla_deg",
        "rla_deg",
        "encounters",
        "total_dv_km_s",
        "arrival_vinf_km_s",
        "arrival_utc",
        "delivered_mass_kg",
        "meets_every_limit",
        "broken_limits",
        "family_jumps",
    ] {
        assert!(rows[0].get(key).is_some(), "days[].{key} missing");
    }
    let top = s["largest_c3_km2_s2"]["value"].as_f64().unwrap();
    assert!(rows.iter().all(|r| r["c3_km2_s2"].as_f64().unwrap() <= top));
    // The CSV: a header and a row per day.
    let c = std::fs::read_to_string(&csv).unwrap();
    assert!(
        c.starts_with("day,launch_utc,c3_km2_s2,vinf_km_s,dla_deg,rla_deg"),
        "{c}"
    );
    assert_eq!(c.lines().count(), 4);
    // Day -1's design, evaluated by `eval`, gives the day's figures.
    let e: serde_json::Value =
        serde_json::from_str(&run_ok(bin().args(["eval", "--json"]).arg(&day))).unwrap();
    assert_eq!(e["launch"]["c3_km2_s2"], rows[0]["c3_km2_s2"]);
    assert_eq!(e["ledger"]["total_dv_km_s"], rows[0]["total_dv_km_s"]);
    assert_eq!(
        e["stops"][0]["epoch_utc"].as_str().unwrap()[..10],
        rows[0]["launch_utc"].as_str().unwrap()[..10]
    );
    // Every day's design in the folder.
    for n in ["day-1.tour.ron", "day0.tour.ron", "day+1.tour.ron"] {
        tourwright::mission::files::load(&days.join(n)).unwrap();
    }
    // The text names the worst days with their units.
    let text = run_ok(bin().arg("period").arg(&lantern).args([
        "--days",
        "3",
        "--evals-per-day",
        "20000",
        "-q",
    ]));
    for w in [
        "largest C3",
        "km²/s²",
        "DLA range",
        "launch-vehicle margin",
        "Preliminary design",
    ] {
        assert!(text.contains(w), "{w}: {text}");
    }
}

#[test]
fn period_refuses_bad_numbers_and_never_writes_over_its_input() {
    let dir = tempfile::tempdir().unwrap();
    let f = copy_of("lantern-jupiter-evej.tour.ron", dir.path());
    let other = copy_of("tern-saturn-ejs.tour.ron", dir.path());
    let before = std::fs::read(&f).unwrap();
    let fail = |args: &[&std::ffi::OsStr]| {
        let out = bin().arg("period").arg(&f).args(args).output().unwrap();
        (out.status.code(), String::from_utf8(out.stderr).unwrap())
    };
    let (code, e) = fail(&["--days".as_ref(), "0".as_ref()]);
    assert_eq!(code, Some(1));
    assert!(e.contains("--days") && e.contains("1 to 366"), "{e}");
    let (code, e) = fail(&["--step".as_ref(), "0".as_ref()]);
    assert_eq!(code, Some(1));
    assert!(
        e.contains("--step") && e.contains("at least an hour"),
        "{e}"
    );
    // A negative step is a number to judge, as a negative --day is, not an unknown option.
    let (code, e) = fail(&["--step".as_ref(), "-1".as_ref()]);
    assert_eq!(code, Some(1));
    assert!(
        e.contains("--step") && e.contains("at least an hour"),
        "{e}"
    );
    let (code, e) = fail(&[
        "--days".as_ref(),
        "300".as_ref(),
        "--step".as_ref(),
        "3".as_ref(),
    ]);
    assert_eq!(code, Some(1));
    assert!(e.contains("--step") && e.contains("366"), "{e}");
    let (code, e) = fail(&[
        "--days".as_ref(),
        "3".as_ref(),
        "--day".as_ref(),
        "5".as_ref(),
        "--out".as_ref(),
        dir.path().join("x.tour.ron").as_os_str(),
    ]);
    assert_eq!(code, Some(1));
    assert!(e.contains("not a day of the period"), "{e}");
    let (code, _) = fail(&["--day".as_ref(), "1".as_ref()]);
    assert_eq!(code, Some(2), "clap: --day needs --out");
    let (code, e) = fail(&["--csv".as_ref(), f.as_os_str()]);
    assert_eq!(code, Some(1));
    assert!(e.contains("never replaces"), "{e}");
    let (code, e) = fail(&["--csv".as_ref(), other.as_os_str()]);
    assert_eq!(code, Some(1));
    assert!(e.contains("holds a design"), "{e}");
    let (code, e) = fail(&[
        "--day".as_ref(),
        "0".as_ref(),
        "--out".as_ref(),
        f.as_os_str(),
    ]);
    assert_eq!(code, Some(1));
    assert!(e.contains("--out"), "{e}");
    // `export --period` refuses its input and a design file too.
    let out = bin()
        .arg("export")
        .arg(&f)
        .arg("--period")
        .arg(&f)
        .output()
        .unwrap();
    assert_eq!(out.status.code(), Some(1));
    let out = bin()
        .arg("export")
        .arg(&f)
        .arg("--period")
        .arg(&other)
        .output()
        .unwrap();
    assert_eq!(out.status.code(), Some(1));
    assert_eq!(std::fs::read(&f).unwrap(), before);
}

#[test]
fn eval_and_export_report_the_launch_period_the_design_asks_for() {
    let f = insight_period();
    let text = run_ok(bin().arg("eval").arg(&f).arg("-q"));
    assert!(text.contains("Event") || text.contains("Launch:"), "{text}");
    assert!(text.contains("Launch period of InSight"), "{text}");
    assert!(text.contains("largest C3"), "{text}");
    assert!(text.contains("arrival held at 2018-11-26"), "{text}");
    let v: serde_json::Value =
        serde_json::from_str(&run_ok(bin().args(["eval", "--json", "-q"]).arg(&f))).unwrap();
    // The evaluation's own fields, and the period beside them.
    assert_eq!(v["stops"].as_array().unwrap().len(), 2);
    assert_eq!(v["launch_period"]["days"].as_array().unwrap().len(), 35);
    assert_eq!(v["launch_period"]["fixed_arrival"], true);
    // A design without the field: no period.
    let v: serde_json::Value = serde_json::from_str(&run_ok(
        bin()
            .args(["eval", "--json"])
            .arg(sample("tern-saturn-ejs.tour.ron")),
    ))
    .unwrap();
    assert!(v.get("launch_period").is_none());
    // The export.
    let dir = tempfile::tempdir().unwrap();
    let csv = dir.path().join("p.csv");
    run_ok(
        bin()
            .arg("export")
            .arg(&f)
            .arg("--period")
            .arg(&csv)
            .arg("-q"),
    );
    let c = std::fs::read_to_string(&csv).unwrap();
    assert!(c.starts_with("day,launch_utc,c3_km2_s2"));
    assert_eq!(c.lines().count(), 36);
    assert!(c.contains("2018-06-08"));
}

#[test]
fn a_period_with_a_day_breaking_a_limit_exits_with_status_3_and_names_it() {
    let dir = tempfile::tempdir().unwrap();
    let text = std::fs::read_to_string(insight_period()).unwrap();
    let capped = text.replacen(
        "    arrival: FlybyOnly,",
        "    arrival: FlybyOnly,\n    launch: (max_c3_km2_s2: Some(12.0)),",
        1,
    );
    assert_ne!(capped, text);
    let f = dir.path().join("capped.tour.ron");
    std::fs::write(&f, capped).unwrap();
    let out = bin().arg("period").arg(&f).arg("-q").output().unwrap();
    assert_eq!(out.status.code(), Some(3));
    let s = String::from_utf8(out.stdout).unwrap();
    // From 3 June (day +12) the C3 is over 12 km²/s² (11.93 on 2 June, 12.32 on 3 June: the
    // engine's own figures on mean elements, not an outside value).
    assert!(
        s.contains("days breaking a limit: +12, +13, +14, +15, +16, +17"),
        "{s}"
    );
    assert!(s.contains("breaks: launch C3"), "{s}");
    let out = bin()
        .arg("period")
        .arg(&f)
        .args(["--json", "-q"])
        .output()
        .unwrap();
    assert_eq!(out.status.code(), Some(3));
    let v: serde_json::Value = serde_json::from_slice(&out.stdout).unwrap();
    assert_eq!(v["every_day_meets_every_limit"], false);
    let last = &v["days"][34];
    assert_eq!(last["meets_every_limit"], false);
    assert!(last["broken_limits"][0].as_str().unwrap().contains("C3"));
}

#[test]
fn ctrl_c_stops_a_launch_period_and_keeps_the_days_finished() {
    let child = bin()
        .arg("period")
        .arg(sample("lantern-jupiter-evej.tour.ron"))
        .args(["--evals-per-day", "500000000", "--days", "5"])
        .stdout(std::process::Stdio::piped())
        .spawn()
        .unwrap();
    std::thread::sleep(std::time::Duration::from_millis(1500));
    let st = Command::new("kill")
        .args(["-INT", &child.id().to_string()])
        .status()
        .unwrap();
    assert!(st.success());
    let out = child.wait_with_output().unwrap();
    assert_eq!(out.status.code(), Some(130));
    let text = String::from_utf8(out.stdout).unwrap();
    assert!(text.contains("interrupted"), "{text}");
    assert!(text.contains("cancelled: 0 of 5 days finished"), "{text}");
}

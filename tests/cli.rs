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
    let out = bin()
        .args(["state", "Earth", "--at", "2000-01-01T12:00:00 TDB"])
        .output()
        .unwrap();
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    let text = String::from_utf8(out.stdout).unwrap();
    let row = text.lines().find(|l| l.starts_with("2000-01-01")).unwrap();
    let f: Vec<f64> = row.split(',').skip(2).map(|x| x.parse().unwrap()).collect();
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
    let text = std::fs::read_to_string(&csv).unwrap();
    assert_eq!(text.lines().count(), 1 + 13);
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
        let pick = |eph: &str| -> Vec<f64> {
            let out = bin()
                .args(["state", "Mars", "--at", "2030-01-01", "--ephemeris", eph])
                .output()
                .unwrap();
            assert!(
                out.status.success(),
                "{}",
                String::from_utf8_lossy(&out.stderr)
            );
            let t = String::from_utf8(out.stdout).unwrap();
            let row = t
                .lines()
                .find(|l| l.starts_with("2030"))
                .unwrap()
                .to_string();
            row.split(',').skip(2).map(|x| x.parse().unwrap()).collect()
        };
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

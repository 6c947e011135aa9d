//! The research-facing surface, run as a user would: `reduce --db` and `--batch` on every
//! class of the published H < 10⁵ tier moved by random matrices; `export` read back with
//! Python's csv and json modules (counts and a sample of rows against the table);
//! the pictures rendered to PNG by rsvg-convert (Debian librsvg2-bin) and checked non-blank
//! and of the stated size; the release folder checked by `sha256sum -c` and its page opened
//! in headless Chromium (Debian chromium) and checked on the screenshot; completions loaded
//! by bash and asked for a subcommand; the man page rendered by man(1).

mod common;

use common::fixture::TestDir;
use common::tier::tier_1e5;
use common::{random_gl2, Rng};
use qorbits::form::Form;
use rug::Integer;
use std::io::Write;
use std::path::Path;
use std::process::{Command, Output, Stdio};

fn qorbits(args: &[&str]) -> Output {
    Command::new(env!("CARGO_BIN_EXE_qorbits"))
        .args(args)
        .output()
        .unwrap()
}

fn ok(args: &[&str]) -> String {
    let o = qorbits(args);
    assert!(
        o.status.success(),
        "{args:?}: {}",
        String::from_utf8_lossy(&o.stderr)
    );
    String::from_utf8(o.stdout).unwrap()
}

fn classes(db: &Path) -> Vec<(i64, String, [i64; 5])> {
    let c = rusqlite::Connection::open(db).unwrap();
    let mut st = c
        .prepare("SELECT id, label, a, b, c, d, e FROM classes ORDER BY id")
        .unwrap();
    st.query_map([], |r| {
        Ok((
            r.get(0)?,
            r.get(1)?,
            [r.get(2)?, r.get(3)?, r.get(4)?, r.get(5)?, r.get(6)?],
        ))
    })
    .unwrap()
    .collect::<Result<_, _>>()
    .unwrap()
}

#[test]
fn batch_lookup_finds_every_class_of_the_tier_from_any_member() {
    let db = tier_1e5();
    let dbs = db.to_str().unwrap();
    let all = classes(&db);
    let mut rng = Rng(11);
    let mut input = String::new();
    for (_, _, f) in &all {
        let g = random_gl2(&mut rng, 6);
        let h = Form::<Integer>::from_i64(*f).act(&g).unwrap();
        input +=
            &h.c.iter()
                .map(|c| c.to_string())
                .collect::<Vec<_>>()
                .join(" ");
        input.push('\n');
    }
    // Errors on their own lines do not stop the batch; comments and blank lines are skipped.
    input += "# a comment\n\n1 2 3\n1 2 1 0 0\n3 1 4 1 5\n";
    let mut child = Command::new(env!("CARGO_BIN_EXE_qorbits"))
        .args(["reduce", "--batch", "-", "--db", dbs])
        .stdin(Stdio::piped())
        .stdout(Stdio::piped())
        .spawn()
        .unwrap();
    let mut stdin = child.stdin.take().unwrap();
    let feed = input.clone();
    let writer = std::thread::spawn(move || stdin.write_all(feed.as_bytes()));
    let o = child.wait_with_output().unwrap();
    writer.join().unwrap().unwrap();
    assert!(o.status.success());
    let lines: Vec<serde_json::Value> = String::from_utf8(o.stdout)
        .unwrap()
        .lines()
        .map(|l| serde_json::from_str(l).unwrap())
        .collect();
    assert_eq!(lines.len(), all.len() + 3, "one line out per form");
    for ((id, label, form), v) in all.iter().zip(&lines) {
        assert_eq!(v["table"]["id"], *id, "{v}");
        assert_eq!(v["table"]["label"], label.as_str(), "{v}");
        assert_eq!(v["form"], serde_json::json!(form), "{v}");
        // γ·input = the canonical form.
        let input: Vec<i64> = v["input"]
            .as_array()
            .unwrap()
            .iter()
            .map(|x| x.as_i64().unwrap())
            .collect();
        let g: Vec<i64> = v["gamma"]
            .as_array()
            .unwrap()
            .iter()
            .flat_map(|r| r.as_array().unwrap().iter().map(|x| x.as_i64().unwrap()))
            .collect();
        let moved = Form::<Integer>::from_i64(input.try_into().unwrap())
            .act(&qorbits::form::Gl2::new(g[0], g[1], g[2], g[3]))
            .unwrap();
        assert_eq!(moved, Form::from_i64(*form));
    }
    let tail = &lines[all.len()..];
    assert!(
        tail[0]["error"].as_str().unwrap().contains("expected 5"),
        "{}",
        tail[0]
    );
    assert_eq!(tail[0]["line"], all.len() + 3);
    assert!(tail[1]["error"]
        .as_str()
        .unwrap()
        .contains("discriminant 0"));
    assert_eq!(tail[2]["table"]["covered"], false);
    assert!(tail[2]["table"]["reason"]
        .as_str()
        .unwrap()
        .contains("not below the table's bound 100000"));
    // The same class through `reduce --db` in text and JSON.
    let t = ok(&["reduce", "2", "1", "-5", "-8", "6", "--db", dbs]);
    assert!(t.contains("not below the table's bound 100000"), "{t}");
    let t = ok(&["reduce", "2", "0", "0", "0", "1", "--db", dbs]);
    assert!(t.contains("table        Q24_0_002, row id 173"), "{t}");
    let j: serde_json::Value = serde_json::from_str(&ok(&[
        "reduce", "--json", "1", "0", "0", "0", "2", "--db", dbs,
    ]))
    .unwrap();
    assert_eq!(j["table"]["label"], "Q24_0_002");
}

/// Runs Python on a script with arguments and returns its stdout.
fn python(script: &str, args: &[&str]) -> String {
    let o = Command::new("python3")
        .arg("-c")
        .arg(script)
        .args(args)
        .output()
        .expect("python3");
    assert!(o.status.success(), "{}", String::from_utf8_lossy(&o.stderr));
    String::from_utf8(o.stdout).unwrap()
}

#[test]
fn exports_read_back_with_python_match_the_table() {
    let db = tier_1e5();
    let dbs = db.to_str().unwrap();
    let d = TestDir::new("export");
    let csv = d.join("t.csv.gz");
    let jsonl = d.join("t.jsonl");
    ok(&[
        "export",
        "--db",
        dbs,
        "--format",
        "csv",
        "--gzip",
        "--out",
        csv.to_str().unwrap(),
        "--quiet",
    ]);
    ok(&[
        "export",
        "--db",
        dbs,
        "--format",
        "jsonl",
        "--out",
        jsonl.to_str().unwrap(),
        "--quiet",
    ]);
    // Python's gzip, csv, json and sqlite3 modules: counts, every id in order, and every
    // 37th row field by field against the table.
    let check = r#"
import csv, gzip, json, sqlite3, sys
con = sqlite3.connect(sys.argv[1])
table = con.execute("SELECT * FROM classes ORDER BY id").fetchall()
names = [d[0] for d in con.execute("SELECT * FROM classes LIMIT 1").description]
local = {}
for r in con.execute("SELECT class_id, p, v_disc, pattern, soluble FROM local ORDER BY class_id, p = 0, p"):
    local.setdefault(r[0], []).append(r[1:])
rows = list(csv.DictReader(gzip.open(sys.argv[2], "rt", newline="")))
objs = [json.loads(l) for l in open(sys.argv[3])]
assert len(rows) == len(table) == len(objs), (len(rows), len(table), len(objs))
assert [int(r["id"]) for r in rows] == [t[0] for t in table] == [o["id"] for o in objs]
for t in table[::37]:
    r, o = rows[t[0] - 1], objs[t[0] - 1]
    for k, v in zip(names, t):
        assert r[k] == ("" if v is None else str(v)), (k, r[k], v)
    cells = [c.split(":") for c in r["local"].split(";")]
    assert [(int(p), None if v == "" else int(v), pat, int(s)) for p, v, pat, s in cells] == local[t[0]]
    assert o["label"] == t[1] and o["form"] == list(t[2:7]) and o["H4"] == t[10]
    assert [(0 if l["place"] == "inf" else int(l["place"]), l["v_disc"], l["pattern"], int(l["soluble"])) for l in o["local"]] == local[t[0]]
    assert o["rational_class_id"] == t[19]
print(len(rows))
"#;
    let n = python(
        check,
        &[dbs, csv.to_str().unwrap(), jsonl.to_str().unwrap()],
    );
    assert_eq!(n.trim(), "1498");
    let c4 = ok(&[
        "export",
        "--db",
        dbs,
        "--format",
        "csv",
        "--where",
        "galois = 'C4'",
        "--quiet",
    ]);
    assert_eq!(
        c4.lines().count(),
        1 + 10,
        "the 10 C4 classes of the manifest, and the header"
    );
    let o = qorbits(&[
        "export",
        "--db",
        dbs,
        "--format",
        "csv",
        "--where",
        "nosuch = 1",
    ]);
    assert_eq!(o.status.code(), Some(2));
}

/// Width, height and the share of non-white pixels of a PNG.
fn png_stats(path: &Path) -> (u32, u32, f64, usize) {
    let dec = png::Decoder::new(std::io::BufReader::new(std::fs::File::open(path).unwrap()));
    let mut reader = dec.read_info().unwrap();
    let mut buf = vec![0; reader.output_buffer_size().unwrap()];
    let info = reader.next_frame(&mut buf).unwrap();
    let px = info.color_type.samples();
    let pixels = &buf[..info.buffer_size()];
    let mut ink = 0usize;
    let mut colours = std::collections::BTreeSet::new();
    for p in pixels.chunks(px) {
        if p[..3.min(px)].iter().any(|&c| c < 200) {
            ink += 1;
        }
        colours.insert(p[..3.min(px)].to_vec());
    }
    (
        info.width,
        info.height,
        ink as f64 / (pixels.len() / px) as f64,
        colours.len(),
    )
}

fn render_svg(svg: &Path) -> (u32, u32, f64, usize) {
    let png = svg.with_extension("png");
    let o = Command::new("rsvg-convert")
        .args([svg.to_str().unwrap(), "-o", png.to_str().unwrap()])
        .output()
        .expect("rsvg-convert (Debian librsvg2-bin) is needed: bash scripts/setup --tests");
    assert!(o.status.success(), "{}", String::from_utf8_lossy(&o.stderr));
    png_stats(&png)
}

#[test]
fn pictures_render_to_png_non_blank_and_of_the_stated_size() {
    let db = tier_1e5();
    let d = TestDir::new("plots");
    let counts = d.join("counts.svg");
    ok(&[
        "plot",
        "--db",
        db.to_str().unwrap(),
        "--out",
        counts.to_str().unwrap(),
    ]);
    let svg = std::fs::read_to_string(&counts).unwrap();
    for words in [
        "X, the height bound",
        "number of classes with H &lt; X",
        "main term",
        "2 real roots",
        "Ratio of the count",
    ] {
        assert!(svg.contains(words), "counts.svg lacks {words:?}");
    }
    let (w, h, ink, colours) = render_svg(&counts);
    assert_eq!((w, h), (1000, 760));
    assert!(ink > 0.01 && ink < 0.5, "ink {ink}");
    assert!(colours > 20, "{colours} colours: the series are drawn");
    let avg = d.join("avg.svg");
    ok(&[
        "selmer-stats",
        "--height",
        "3000",
        "--quiet",
        "--plot",
        avg.to_str().unwrap(),
    ]);
    let svg = std::fs::read_to_string(&avg).unwrap();
    assert!(svg.contains("published limit 3") && svg.contains("Y, the height bound"));
    let (w, h, ink, _) = render_svg(&avg);
    assert_eq!((w, h), (1000, 760));
    assert!(ink > 0.005, "ink {ink}");
    // An existing file is not replaced without --force.
    let o = qorbits(&[
        "plot",
        "--db",
        db.to_str().unwrap(),
        "--out",
        counts.to_str().unwrap(),
    ]);
    assert_eq!(o.status.code(), Some(2));
}

#[test]
fn the_release_folder_verifies_and_its_page_renders_in_chromium() {
    let db = tier_1e5();
    let d = TestDir::new("release");
    let out = d.join("rel");
    ok(&[
        "release",
        "--db",
        db.to_str().unwrap(),
        "--out",
        out.to_str().unwrap(),
        "--year",
        "2026",
    ]);
    let o = Command::new("sha256sum")
        .arg("-c")
        .arg("SHA256SUMS")
        .current_dir(&out)
        .output()
        .unwrap();
    assert!(o.status.success(), "{}", String::from_utf8_lossy(&o.stdout));
    assert_eq!(
        String::from_utf8_lossy(&o.stdout).matches(": OK").count(),
        5
    );
    // The gzipped table is the table, and the manifest verifies it.
    let gz = std::fs::File::open(out.join("qorbits-h1e5.sqlite.gz")).unwrap();
    let mut bytes = Vec::new();
    std::io::Read::read_to_end(&mut flate2::read::GzDecoder::new(gz), &mut bytes).unwrap();
    assert_eq!(bytes, std::fs::read(&db).unwrap());
    let html = std::fs::read_to_string(out.join("index.html")).unwrap();
    let m =
        qorbits::table::manifest::read_manifest(&out.join("qorbits-h1e5.manifest.json")).unwrap();
    for needle in [
        m.content_sha256.as_str(),
        m.file.sha256.as_str(),
        "sha256sum -c SHA256SUMS",
        "@misc{",
        "1498",
        "0.164",
        "counts.svg",
    ] {
        assert!(html.contains(needle), "index.html lacks {needle}");
    }
    assert!(
        !html.contains("http://") && !html.contains("https://"),
        "the page needs no network"
    );
    let cff = std::fs::read_to_string(out.join("CITATION.cff")).unwrap();
    assert!(cff.starts_with("cff-version: 1.2.0") && cff.contains(&m.content_sha256));
    let shot = d.join("page.png");
    let profile = d.join("profile");
    let o = Command::new("chromium")
        .args([
            "--headless",
            "--no-sandbox",
            "--disable-gpu",
            "--disable-quic",
            "--no-first-run",
            "--disable-background-networking",
            "--disable-component-update",
            "--disable-sync",
            &format!("--user-data-dir={}", profile.display()),
            &format!("--screenshot={}", shot.display()),
            "--window-size=1200,1600",
            &format!("file://{}", out.join("index.html").display()),
        ])
        .output()
        .expect("chromium (Debian) is needed: bash scripts/setup --tests");
    assert!(
        shot.exists(),
        "no screenshot: {}",
        String::from_utf8_lossy(&o.stderr)
    );
    let (w, h, ink, colours) = png_stats(&shot);
    assert_eq!((w, h), (1200, 1600));
    assert!(ink > 0.02, "the page is blank: {ink}");
    assert!(
        colours > 50,
        "text, tables and the picture: {colours} colours"
    );
}

#[test]
fn completions_load_in_bash_and_the_man_page_renders() {
    let script = ok(&["completions", "bash"]);
    let d = TestDir::new("shell");
    let f = d.join("qorbits.bash");
    std::fs::write(&f, &script).unwrap();
    let o = Command::new("bash")
        .arg("-c")
        .arg(format!(
            "source {}; COMP_WORDS=(qorbits cla); COMP_CWORD=1; _qorbits qorbits cla qorbits; echo ${{COMPREPLY[@]}}; \
             COMP_WORDS=(qorbits classes --dis); COMP_CWORD=2; _qorbits qorbits --dis classes; echo ${{COMPREPLY[@]}}",
            f.display()
        ))
        .output()
        .unwrap();
    let got = String::from_utf8_lossy(&o.stdout);
    let mut lines = got.lines();
    assert_eq!(lines.next(), Some("classes"), "{got}");
    assert_eq!(lines.next(), Some("--disc"), "{got}");
    for shell in ["zsh", "fish"] {
        let s = ok(&["completions", shell]);
        for sub in ["reduce", "export", "release", "plot"] {
            assert!(s.contains(sub), "{shell}: {sub}");
        }
    }
    let page = ok(&["man"]);
    assert!(page.contains(".TH qorbits 1"));
    let o = Command::new("man")
        .args(["-l", "-"])
        .env("MANWIDTH", "80")
        .stdin(Stdio::piped())
        .stdout(Stdio::piped())
        .spawn()
        .and_then(|mut c| {
            c.stdin
                .take()
                .unwrap()
                .write_all(ok(&["man", "export"]).as_bytes())?;
            c.wait_with_output()
        })
        .unwrap();
    let text = String::from_utf8_lossy(&o.stdout);
    assert!(
        text.contains("qorbits-export") && text.contains("--where"),
        "{text}"
    );
    assert_eq!(qorbits(&["man", "nosuch"]).status.code(), Some(2));
}

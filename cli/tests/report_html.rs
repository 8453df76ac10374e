//! report.html in a real browser (issue 23): headless Chromium loads the
//! page of an example case with no console message, finds every picture
//! inline, and takes a screenshot. CI installs Chromium from Debian's
//! packages (.ci/run); elsewhere set LODESTONE_NO_BROWSER=1 to skip it, and
//! the test says so.

use std::path::{Path, PathBuf};
use std::process::Command;

fn chromium() -> Option<PathBuf> {
    ["/usr/bin/chromium", "/usr/bin/chromium-browser"]
        .iter()
        .map(PathBuf::from)
        .find(|p| p.exists())
}

/// Runs headless Chromium on a page with the flags a closed network needs;
/// returns its stdout and stderr.
fn browse(browser: &Path, profile: &Path, args: &[&str]) -> (String, String) {
    let o = Command::new(browser)
        .args([
            "--headless",
            "--no-sandbox",
            "--disable-gpu",
            "--disable-quic",
            "--no-first-run",
            "--disable-background-networking",
            "--disable-component-update",
            "--disable-sync",
            "--enable-logging=stderr",
            "--v=0",
        ])
        .arg(format!("--user-data-dir={}", profile.display()))
        .args(args)
        .output()
        .expect("chromium runs");
    (String::from_utf8_lossy(&o.stdout).into_owned(), String::from_utf8_lossy(&o.stderr).into_owned())
}

#[test]
fn the_report_page_loads_cleanly_in_headless_chromium() {
    let Some(browser) = chromium() else {
        if std::env::var_os("LODESTONE_NO_BROWSER").is_some() {
            eprintln!("skipped: no Chromium and LODESTONE_NO_BROWSER set");
            return;
        }
        panic!("Chromium is not installed (apt-get install chromium), or set LODESTONE_NO_BROWSER=1 to skip this test");
    };
    let dir = std::env::temp_dir().join(format!("lodestone-html-{}", std::process::id()));
    let _ = std::fs::remove_dir_all(&dir);
    let out = dir.join("out");
    let case = Path::new(env!("CARGO_MANIFEST_DIR")).join("../cases/pot-magnet.toml");
    let o = Command::new(env!("CARGO_BIN_EXE_lodestone"))
        .args(["solve", "--quiet", case.to_str().unwrap(), "-o", out.to_str().unwrap()])
        .output()
        .unwrap();
    assert_eq!(o.status.code(), Some(0), "{}", String::from_utf8_lossy(&o.stderr));
    let page = out.join("report.html");
    let html = std::fs::read_to_string(&page).unwrap();
    // Self-contained: nothing to fetch, beside it or on a network.
    assert!(
        !html.contains("src=") && !html.contains("href=") && !html.contains("url("),
        "the page refers to another file"
    );

    let url = format!("file://{}", page.display());
    let (dom, log) = browse(&browser, &dir.join("profile-1"), &["--dump-dom", &url]);
    let console: Vec<&str> = log.lines().filter(|l| l.contains(":CONSOLE")).collect();
    assert!(console.is_empty(), "console messages: {console:?}");
    assert!(
        dom.contains("<h1>pot magnet pulling a 6 mm plate</h1>"),
        "the page did not load: {}",
        &dom[..dom.len().min(300)]
    );
    let md = std::fs::read_to_string(out.join("report.md")).unwrap();
    let pictures = md.lines().filter(|l| l.starts_with("![")).count();
    assert!(pictures >= 3);
    assert_eq!(dom.matches("<figure>").count(), pictures, "every picture of report.md is inline");
    assert!(dom.find("class=\"warnings\"") < dom.find("<h2>Forces</h2>"), "warnings come first");

    let shot = dir.join("report.png");
    browse(
        &browser,
        &dir.join("profile-2"),
        &[&format!("--screenshot={}", shot.display()), "--window-size=1000,1400", &url],
    );
    let png = std::fs::read(&shot).expect("a screenshot");
    assert!(
        png.starts_with(b"\x89PNG") && png.len() > 20_000,
        "the screenshot is empty ({} bytes)",
        png.len()
    );
    let keep = Path::new(env!("CARGO_TARGET_TMPDIR")).join("report-screenshot.png");
    let _ = std::fs::copy(&shot, &keep);
    eprintln!("screenshot: {}", keep.display());
    let _ = std::fs::remove_dir_all(&dir);
}

//! Plot files and the HTML report of a finished run: produced, valid, of the stated size, and
//! consistent with the run's own results.
use serde_json::Value;
use std::path::Path;

/// Width and height from a PNG's IHDR chunk (PNG spec: signature, then IHDR at byte 8).
fn png_size(bytes: &[u8]) -> Option<(u32, u32)> {
    const SIG: [u8; 8] = [0x89, b'P', b'N', b'G', 0x0d, 0x0a, 0x1a, 0x0a];
    if bytes.len() < 24 || bytes[..8] != SIG || &bytes[12..16] != b"IHDR" {
        return None;
    }
    let be = |b: &[u8]| u32::from_be_bytes([b[0], b[1], b[2], b[3]]);
    Some((be(&bytes[16..20]), be(&bytes[20..24])))
}

fn svg_size(text: &str) -> Option<(u32, u32)> {
    let head = &text[text.find("<svg")?..];
    let attr = |name: &str| -> Option<u32> {
        let k = head.find(&format!("{name}=\""))? + name.len() + 2;
        head[k..].split('"').next()?.parse().ok()
    };
    Some((attr("width")?, attr("height")?))
}

/// Every plot listed in plots.json exists and is a valid PNG/SVG/GIF of the listed size; the
/// frost line saved with the field agrees with the run's frost depth on that day.
pub fn check_plots(out: &Path, summary: &Value) {
    let index: Value =
        serde_json::from_slice(&std::fs::read(out.join("plots.json")).unwrap()).unwrap();
    let plots = index["plots"].as_array().unwrap();
    let mut stems = Vec::new();
    for p in plots {
        let file = p["file"].as_str().unwrap();
        let size = (
            p["width_px"].as_u64().unwrap() as u32,
            p["height_px"].as_u64().unwrap() as u32,
        );
        let bytes = std::fs::read(out.join(file)).unwrap();
        if file.ends_with(".png") {
            assert_eq!(png_size(&bytes), Some(size), "{file}");
        } else if file.ends_with(".svg") {
            let text = String::from_utf8(bytes).unwrap();
            assert_eq!(svg_size(&text), Some(size), "{file}");
            assert!(text.trim_end().ends_with("</svg>"), "{file} not closed");
            assert_eq!(text.matches("<svg").count(), 1);
            // Embedded rasters (the field's shading) as RFC 2397 data URLs of type image/png.
            assert_eq!(
                text.matches("<image").count(),
                text.matches("href=\"data:image/png;base64,").count(),
                "{file}"
            );
        } else if file.ends_with(".gif") {
            assert!(
                bytes.starts_with(b"GIF89a") || bytes.starts_with(b"GIF87a"),
                "{file}"
            );
            let w = u16::from_le_bytes([bytes[6], bytes[7]]) as u32;
            let h = u16::from_le_bytes([bytes[8], bytes[9]]) as u32;
            assert_eq!((w, h), size, "{file}");
        }
        stems.push(file.split('.').next().unwrap().to_string());
    }
    for want in [
        "soil_temperature",
        "soil_temperature_zoom",
        "frost_depth",
        "heat_loss",
        "probes",
    ] {
        assert!(
            stems.iter().filter(|s| *s == want).count() >= 2,
            "{want}.png and .svg expected"
        );
    }
    // Frost line of the plotted day vs the frost depth at the far edge on that day (daily.csv).
    let doy = index["day_of_year"].as_u64().unwrap();
    let line = std::fs::read_to_string(out.join(format!("frost_line_{doy:03}.csv"))).unwrap();
    let pts: Vec<(f64, f64)> = line
        .lines()
        .filter(|l| !l.starts_with('#') && !l.starts_with("line"))
        .map(|l| {
            let v: Vec<f64> = l.split(',').map(|x| x.parse().unwrap()).collect();
            (v[1], v[2])
        })
        .collect();
    let daily = std::fs::read_to_string(out.join("daily.csv")).unwrap();
    let row = daily
        .lines()
        .filter(|l| !l.starts_with('#'))
        .find(|l| l.split(',').next() == Some(&doy.to_string()))
        .unwrap();
    let col = daily
        .lines()
        .next()
        .unwrap()
        .split(',')
        .position(|h| h == "frost_depth_open_ground_m")
        .unwrap();
    let open: f64 = row.split(',').nth(col).unwrap().parse().unwrap();
    if open > 0.0 {
        let x_far = pts.iter().map(|p| p.0).fold(f64::MIN, f64::max);
        let z_far = pts
            .iter()
            .filter(|p| p.0 > x_far - 1e-6)
            .map(|p| p.1)
            .fold(f64::MIN, f64::max);
        // Both place the frost line between the same two cell centres (one by the frozen
        // fraction, one by the temperature of the interval's midpoint): within 0.1 m at ~2 m.
        assert!(
            (z_far - open).abs() < 0.1,
            "frost line at the far edge {z_far} vs daily frost depth {open}"
        );
    }
    assert!(
        summary["frost_depth_open_ground_m"].as_f64().unwrap() >= open - 1e-4,
        "daily.csv rounds to 0.1 mm"
    );
}

/// report.html is one well-formed, self-contained file with every figure and table it promises.
pub fn check_report(out: &Path, summary: &Value) {
    let html = std::fs::read_to_string(out.join("report.html")).unwrap();
    assert!(html.starts_with("<!DOCTYPE html>"));
    assert!(html.trim_end().ends_with("</html>"));
    for tag in [
        "html", "head", "body", "table", "tr", "td", "figure", "pre", "ul", "h2",
    ] {
        let open =
            html.matches(&format!("<{tag}>")).count() + html.matches(&format!("<{tag} ")).count();
        let close = html.matches(&format!("</{tag}>")).count();
        assert_eq!(open, close, "<{tag}> opened {open}, closed {close}");
    }
    assert!(
        !html.contains("http://") && !html.contains("https://"),
        "no network references"
    );
    for id in ["results", "figures", "numerics", "inputs", "cautions"] {
        assert!(html.contains(&format!("id=\"{id}\"")), "section {id}");
    }
    for fig in [
        "soil_temperature",
        "soil_temperature_zoom",
        "foundation_sketch",
        "frost_depth",
        "heat_loss",
        "probes",
    ] {
        assert!(
            html.contains(&format!("id=\"fig-{fig}\"><img width=")),
            "figure {fig}"
        );
    }
    assert_eq!(html.matches("src=\"data:image/png;base64,").count(), 6);
    assert!(html.contains("Results are engineering estimates"));
    assert!(html.contains("ISO 13370") && html.contains("modified Berggren"));
    let kwh = format!("{:.0}", summary["annual_heat_loss_kwh"].as_f64().unwrap());
    assert!(
        html.contains(&format!("<td class=n>{kwh}</td>")),
        "annual heat loss {kwh} in the table"
    );
    assert!(html.contains("[building]"), "the case file as read");
}

//! The report renders: every SVG parses as XML and has its expected parts.

use quick_xml::events::Event;
use quick_xml::Reader;
use std::collections::BTreeMap;
use std::path::Path;
use std::process::Command;

/// Element names and class attributes of an SVG, with counts; panics on malformed XML.
fn inventory(svg: &str) -> BTreeMap<String, usize> {
    let mut reader = Reader::from_str(svg);
    let mut seen = BTreeMap::new();
    loop {
        match reader.read_event() {
            Ok(Event::Start(e)) | Ok(Event::Empty(e)) => {
                *seen.entry(String::from_utf8_lossy(e.name().as_ref()).into_owned()).or_insert(0) += 1;
                for a in e.attributes().flatten() {
                    if a.key.as_ref() == b"class" {
                        *seen.entry(format!(".{}", String::from_utf8_lossy(&a.value))).or_insert(0) += 1;
                    }
                }
            }
            Ok(Event::Eof) => return seen,
            Ok(_) => {}
            Err(e) => panic!("malformed SVG: {e}"),
        }
    }
}

/// Solves an example case into a fresh temporary folder and returns the folder.
fn solved(example: &str, tag: &str) -> std::path::PathBuf {
    let case = Path::new(env!("CARGO_MANIFEST_DIR")).join("../cases").join(example);
    let out = std::env::temp_dir().join(format!("lodestone-{tag}-{}", std::process::id()));
    let run = Command::new(env!("CARGO_BIN_EXE_lodestone"))
        .args(["solve", "--quiet", case.to_str().unwrap(), "-o", out.to_str().unwrap()])
        .output()
        .unwrap();
    assert!(run.status.success(), "{}", String::from_utf8_lossy(&run.stderr));
    out
}

#[test]
fn report_pictures_parse_and_have_their_parts() {
    let out = solved("pot-magnet.toml", "report");
    let map = inventory(&std::fs::read_to_string(out.join("field-map.svg")).unwrap());
    for part in [".field", ".fluxlines", ".outlines", ".colourbar", ".axis", "text", "rect", "line"] {
        assert!(map.contains_key(part), "field map lacks {part}: {map:?}");
    }
    for chart in ["probe-axis.svg", "bh-cup.svg", "magnet-magnet.svg"] {
        let map = inventory(&std::fs::read_to_string(out.join(chart)).unwrap());
        for part in [".axes", ".xlabel", ".ylabel", "polyline", "text"] {
            assert!(map.contains_key(part), "{chart} lacks {part}: {map:?}");
        }
    }
    let report = std::fs::read_to_string(out.join("report.md")).unwrap();
    for section in [
        "## Forces",
        "## Parts",
        "## Magnets",
        "## Stray field",
        "## Cautions",
        "field-map.svg",
        "implanted",
        "IATA",
    ] {
        assert!(report.contains(section), "report lacks {section}");
    }
    let _ = std::fs::remove_dir_all(&out);
}

#[test]
fn the_field_map_rasterises_to_png_with_the_field_drawn() {
    let out = solved("speaker-motor.toml", "raster");
    let svg = std::fs::read(out.join("field-map.svg")).unwrap();
    let tree = resvg::usvg::Tree::from_data(&svg, &resvg::usvg::Options::default()).expect("the SVG parses for rendering");
    let size = tree.size().to_int_size();
    let mut pixmap = resvg::tiny_skia::Pixmap::new(size.width(), size.height()).unwrap();
    resvg::render(&tree, resvg::tiny_skia::Transform::identity(), &mut pixmap.as_mut());
    let png = pixmap.encode_png().expect("PNG encoding");
    assert!(png.starts_with(&[0x89, b'P', b'N', b'G']));
    // The plot area is painted (white only along the part outlines), and its colours vary.
    let (w, h) = (pixmap.width() as usize, pixmap.height() as usize);
    let px = |x: usize, y: usize| pixmap.pixels()[y * w + x];
    let mut colours = std::collections::BTreeSet::new();
    let (mut white, mut total) = (0, 0);
    for y in (10..h - 60).step_by(7) {
        for x in (10..w - 140).step_by(7) {
            let p = px(x, y);
            total += 1;
            if p.red() > 250 && p.green() > 250 && p.blue() > 250 {
                white += 1;
            }
            colours.insert((p.red() / 16, p.green() / 16, p.blue() / 16));
        }
    }
    assert!(white * 50 < total, "{white} of {total} samples white");
    assert!(colours.len() >= 5, "only {} colours in the map", colours.len());
    std::fs::write(out.join("field-map.png"), &png).unwrap();
    let _ = std::fs::remove_dir_all(&out);
}

#[test]
fn field_vtu_reads_back_with_its_arrays() {
    let out = solved("magnet-bare.toml", "vtu");
    let vtk = vtkio::Vtk::import(out.join("field.vtu")).expect("field.vtu reads back");
    let vtkio::model::DataSet::UnstructuredGrid { pieces, .. } = vtk.data else {
        panic!("not an unstructured grid")
    };
    let vtkio::model::Piece::Inline(piece) = &pieces[0] else {
        panic!("piece not inline")
    };
    let n_cells = piece.cells.types.len();
    let names = |attrs: &[vtkio::model::Attribute]| -> Vec<(String, usize)> {
        attrs
            .iter()
            .filter_map(|a| match a {
                vtkio::model::Attribute::DataArray(d) => Some((d.name.clone(), d.data.len())),
                _ => None,
            })
            .collect()
    };
    let cell = names(&piece.data.cell);
    for (name, per_cell) in [
        ("part", 1),
        ("material", 1),
        ("B", 3),
        ("B_magnitude", 1),
        ("H", 3),
        ("relative_permeability", 1),
    ] {
        let found = cell.iter().find(|(n, _)| n == name).unwrap_or_else(|| panic!("no cell array {name}: {cell:?}"));
        assert_eq!(found.1, per_cell * n_cells, "{name}");
    }
    let point = names(&piece.data.point);
    assert!(point.iter().any(|(n, len)| n == "potential" && *len == piece.num_points()), "{point:?}");
    // The names behind the numbers, as VTK string arrays in the field data
    // (byte codes, each string ended by 0; VTK's own reader gives them back
    // as ['magnet'] and ['air', 'N38']).
    let xml = std::fs::read_to_string(out.join("field.vtu")).unwrap();
    let strings = |name: &str| -> Vec<String> {
        let start = xml.find(&format!("Name=\"{name}\"")).unwrap_or_else(|| panic!("no field array {name}"));
        let body = &xml[start..][xml[start..].find('>').unwrap() + 1..];
        let codes: Vec<u8> = body[..body.find('<').unwrap()].split_whitespace().map(|c| c.parse().unwrap()).collect();
        codes
            .split(|c| *c == 0)
            .filter(|s| !s.is_empty())
            .map(|s| String::from_utf8(s.to_vec()).unwrap())
            .collect()
    };
    assert_eq!(strings("part_names"), ["magnet"]);
    assert_eq!(strings("material_names"), ["air", "N38"]);
    let _ = std::fs::remove_dir_all(&out);
}

#[test]
fn mesh_picture_frames_the_parts_not_the_whole_disk() {
    // A bare disk with a short probe: the open boundary's disk is several
    // times the magnet's size; mesh.svg draws the parts and probes with half
    // their extent around them, clipped, and leaves the far air out.
    let dir = std::env::temp_dir().join(format!("lodestone-meshsvg-{}", std::process::id()));
    let _ = std::fs::remove_dir_all(&dir);
    std::fs::create_dir_all(&dir).unwrap();
    let case = dir.join("disk.toml");
    std::fs::write(
        &case,
        "[study]\ngeometry = \"axisymmetric\"\nunit = \"mm\"\n\n[[part]]\nname = \"magnet\"\nmaterial = \"N42\"\nmagnetization = \"+z\"\nrect = { from = [0, 0], to = [5, 3] }\n\n[[probe]]\nname = \"p\"\npoint = [0, 20]\n",
    )
    .unwrap();
    let out = dir.join("out");
    let run = Command::new(env!("CARGO_BIN_EXE_lodestone"))
        .args(["mesh", "--quiet", case.to_str().unwrap(), "-o", out.to_str().unwrap()])
        .output()
        .unwrap();
    assert!(run.status.success(), "{}", String::from_utf8_lossy(&run.stderr));
    let summary = String::from_utf8_lossy(&run.stdout);
    let total: usize = summary
        .split(", ")
        .nth(1)
        .and_then(|s| s.split(' ').next())
        .and_then(|n| n.parse().ok())
        .unwrap();
    let magnet: usize = summary
        .lines()
        .find(|l| l.trim_start().starts_with("magnet"))
        .and_then(|l| l.split_whitespace().nth(1)?.parse().ok())
        .unwrap();
    let svg = std::fs::read_to_string(out.join("mesh.svg")).unwrap();
    let map = inventory(&svg);
    // One path per region, a closed subpath (ending in Z) per triangle.
    let drawn: usize = svg.split(" d=\"").skip(1).map(|d| d.split('"').next().unwrap_or("").matches('Z').count()).sum();
    assert!(map.contains_key("path"), "{map:?}");
    assert!(map.contains_key("clipPath"), "{map:?}");
    assert!(drawn < total && drawn > magnet, "drew {drawn} of {total} triangles ({magnet} in the magnet)");
    let _ = std::fs::remove_dir_all(&dir);
}

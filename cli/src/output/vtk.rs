//! VTK unstructured grids (.vtu) of the physical region: mesh.vtu and field.vtu.

use crate::case::Model;
use mesher::{Mesh, Region};
use solver::Solution;
use vtkio::model::{Attribute, Attributes, ByteOrder, CellType, Cells, DataSet, IOBuffer, UnstructuredGridPiece, Version, VertexNumbers, Vtk};

fn grid(model: &Model, mesh: &Mesh, point: Vec<Attribute>, cell: Vec<Attribute>) -> Result<Vec<u8>, String> {
    let title = &model.title;
    let points: Vec<f64> = mesh.nodes[..mesh.n_physical].iter().flat_map(|p| [p[0], p[1], 0.0]).collect();
    let connectivity: Vec<u64> = mesh.triangles.iter().flat_map(|t| t.map(|n| n as u64)).collect();
    let offsets: Vec<u64> = (1..=mesh.triangles.len() as u64).map(|i| 3 * i).collect();
    let piece = UnstructuredGridPiece {
        points: IOBuffer::F64(points),
        cells: Cells {
            cell_verts: VertexNumbers::XML { connectivity, offsets },
            types: vec![CellType::Triangle; mesh.triangles.len()],
        },
        data: Attributes { point, cell },
    };
    let vtk = Vtk {
        version: Version::new_xml(1, 0),
        title: title.into(),
        byte_order: ByteOrder::LittleEndian,
        data: DataSet::inline(piece),
        file_path: None,
    };
    let mut out = Vec::new();
    vtk.write_xml(&mut out).map_err(|e| format!("cannot encode VTK: {e}"))?;
    with_names(out, model)
}

/// The names behind the `part` and `material` numbers, as the grid's field
/// data: string arrays `part_names` (index = part number) and
/// `material_names` (index = material number, 0 = air), so a viewer's
/// legend can say "magnet (N42)" where the cells say 0. VTK's ascii string
/// arrays hold each string's byte codes, each string ended by a 0.
fn with_names(xml: Vec<u8>, model: &Model) -> Result<Vec<u8>, String> {
    let text = String::from_utf8(xml).map_err(|e| format!("cannot encode VTK: {e}"))?;
    let Some(at) = text.find("<Piece") else {
        return Err("cannot encode VTK: no piece".into());
    };
    let array = |name: &str, items: &[&str]| {
        let codes: Vec<String> = items.iter().flat_map(|s| s.bytes().map(|b| b.to_string()).chain(["0".to_string()])).collect();
        format!(
            "<Array type=\"String\" Name=\"{name}\" NumberOfTuples=\"{}\" format=\"ascii\">{}</Array>",
            items.len(),
            codes.join(" ")
        )
    };
    let parts: Vec<&str> = model.parts.iter().map(|p| p.name.as_str()).collect();
    let field = format!(
        "<FieldData>{}{}</FieldData>",
        array("part_names", &parts),
        array("material_names", &material_names(model))
    );
    Ok(format!("{}{field}{}", &text[..at], &text[at..]).into_bytes())
}

/// Material names in the order of the `material` numbers: air first, then
/// each part's material where it first appears.
fn material_names(model: &Model) -> Vec<&str> {
    let mut names: Vec<&str> = vec!["air"];
    for p in &model.parts {
        if !names.contains(&p.material.name.as_str()) {
            names.push(&p.material.name);
        }
    }
    names
}

fn region_arrays(model: &Model, mesh: &Mesh) -> Vec<Attribute> {
    let names = material_names(model);
    let part: Vec<i32> = mesh.regions.iter().map(|r| if let Region::Part(i) = r { *i as i32 } else { -1 }).collect();
    let material: Vec<i32> = mesh
        .regions
        .iter()
        .map(|r| match r {
            Region::Part(i) => names.iter().position(|n| *n == model.parts[*i].material.name).unwrap_or(0) as i32,
            Region::Air => 0,
        })
        .collect();
    vec![
        Attribute::scalars("part", 1).with_data(part),
        Attribute::scalars("material", 1).with_data(material),
    ]
}

pub fn mesh_vtu(model: &Model, mesh: &Mesh) -> Result<Vec<u8>, String> {
    grid(model, mesh, Vec::new(), region_arrays(model, mesh))
}

/// Flux lines are contours of the flux function: A_z itself when planar
/// (Wb per metre), but 2 pi r A_phi about the axis (the flux through the
/// circle of radius r, Wb): contours of A_phi are not flux lines.
fn flux_function(symmetry: mesher::Symmetry, nodes: &[[f64; 2]], potential: &[f64]) -> Vec<f64> {
    match symmetry {
        mesher::Symmetry::Planar => potential.to_vec(),
        mesher::Symmetry::Axisymmetric => potential.iter().zip(nodes).map(|(a, x)| 2.0 * std::f64::consts::PI * x[0] * a).collect(),
    }
}

/// field.vtu: potential and flux function at the nodes, B, |B|, H and
/// relative permeability per triangle, with part and material numbers.
pub fn field_vtu(model: &Model, sol: &Solution) -> Result<Vec<u8>, String> {
    let mesh = sol.problem.mesh;
    let potential: Vec<f64> = (0..mesh.n_physical).map(|n| sol.node_potential(n)).collect();
    let flux_function = flux_function(mesh.symmetry, &mesh.nodes, &potential);
    let n = mesh.triangles.len();
    use rayon::prelude::*;
    let per: Vec<([f64; 2], [f64; 2], f64)> = (0..n)
        .into_par_iter()
        .map(|e| {
            let be = sol.element_b(e);
            // The element's own law: a radial magnet's elements point their own ways.
            let law = sol.element_law(e);
            (be, sol.element_h(e, be), law.relative_permeability(be))
        })
        .collect();
    let b: Vec<f64> = per.iter().flat_map(|p| [p.0[0], p.0[1], 0.0]).collect();
    let h: Vec<f64> = per.iter().flat_map(|p| [p.1[0], p.1[1], 0.0]).collect();
    let bm: Vec<f64> = per.iter().map(|p| p.0[0].hypot(p.0[1])).collect();
    let mu: Vec<f64> = per.iter().map(|p| p.2).collect();
    let mut cell = region_arrays(model, mesh);
    cell.push(Attribute::vectors("B").with_data(b));
    cell.push(Attribute::scalars("B_magnitude", 1).with_data(bm));
    cell.push(Attribute::vectors("H").with_data(h));
    cell.push(Attribute::scalars("relative_permeability", 1).with_data(mu));
    let point = vec![
        Attribute::scalars("potential", 1).with_data(potential),
        Attribute::scalars("flux_function", 1).with_data(flux_function),
    ];
    grid(model, mesh, point, cell)
}

#[cfg(test)]
mod tests {
    use super::flux_function;

    #[test]
    fn the_axisymmetric_flux_function_is_the_flux_through_the_circle() {
        // A uniform B0 along z has A_phi = B0 r / 2; the flux through the circle
        // of radius r is B0 pi r^2 (Gauss's law for a uniform field).
        let b0 = 0.3;
        let nodes: Vec<[f64; 2]> = (0..20).map(|i| [0.001 * i as f64, 0.01]).collect();
        let a: Vec<f64> = nodes.iter().map(|x| b0 * x[0] / 2.0).collect();
        let f = flux_function(mesher::Symmetry::Axisymmetric, &nodes, &a);
        for (x, phi) in nodes.iter().zip(f) {
            let exact = b0 * std::f64::consts::PI * x[0] * x[0];
            assert!((phi - exact).abs() <= 1e-15, "{phi} against {exact}");
        }
        assert_eq!(flux_function(mesher::Symmetry::Planar, &nodes, &a), a);
    }
}

//! VTK unstructured grids (.vtu) of the physical region: mesh.vtu and field.vtu.

use crate::case::Model;
use mesher::{Mesh, Region};
use solver::Solution;
use vtkio::model::{Attribute, Attributes, ByteOrder, CellType, Cells, DataSet, IOBuffer, UnstructuredGridPiece, Version, VertexNumbers, Vtk};

fn grid(mesh: &Mesh, title: &str, point: Vec<Attribute>, cell: Vec<Attribute>) -> Result<Vec<u8>, String> {
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
    Ok(out)
}

fn region_arrays(model: &Model, mesh: &Mesh) -> Vec<Attribute> {
    let mut names: Vec<&str> = vec!["air"];
    for p in &model.parts {
        if !names.contains(&p.material.name.as_str()) {
            names.push(&p.material.name);
        }
    }
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
    grid(mesh, &model.title, Vec::new(), region_arrays(model, mesh))
}

pub fn field_vtu(model: &Model, sol: &Solution) -> Result<Vec<u8>, String> {
    let mesh = sol.problem.mesh;
    let potential: Vec<f64> = (0..mesh.n_physical).map(|n| sol.node_potential(n)).collect();
    let n = mesh.triangles.len();
    use rayon::prelude::*;
    let per: Vec<([f64; 2], [f64; 2], f64)> = (0..n)
        .into_par_iter()
        .map(|e| {
            let be = sol.element_b(e);
            let law = sol.law(sol.elements.kinds[e]);
            (be, law.response(be).h, law.relative_permeability(be))
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
    grid(mesh, &model.title, vec![Attribute::scalars("potential", 1).with_data(potential)], cell)
}

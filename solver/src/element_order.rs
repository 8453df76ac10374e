//! The element orders and their node layout: what every kernel, rule and
//! table is indexed by. Depends on nothing else in the crate.

/// Most nodes an element has (order 4).
pub const MAX_NODES: usize = 15;

/// Polynomial order of the potential in each triangle.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum ElementOrder {
    /// Three-node triangles, potential linear.
    Linear,
    /// Six-node triangles, potential quadratic.
    Quadratic,
    /// Ten-node triangles, potential cubic.
    Cubic,
    /// Fifteen-node triangles, potential quartic.
    Quartic,
}

impl ElementOrder {
    /// The order of degree p (1 to 4).
    pub fn of_degree(p: u32) -> Option<ElementOrder> {
        match p {
            1 => Some(ElementOrder::Linear),
            2 => Some(ElementOrder::Quadratic),
            3 => Some(ElementOrder::Cubic),
            4 => Some(ElementOrder::Quartic),
            _ => None,
        }
    }

    /// The polynomial degree p.
    pub fn degree(self) -> usize {
        match self {
            ElementOrder::Linear => 1,
            ElementOrder::Quadratic => 2,
            ElementOrder::Cubic => 3,
            ElementOrder::Quartic => 4,
        }
    }

    /// Nodes per element: (p + 1)(p + 2) / 2.
    pub fn n_nodes(self) -> usize {
        let p = self.degree();
        (p + 1) * (p + 2) / 2
    }

    /// Nodes inside each edge: p - 1.
    pub fn per_edge(self) -> usize {
        self.degree() - 1
    }

    /// The barycentric lattice index (i, j, k), i + j + k = p, of each node.
    pub fn lattice(self) -> &'static [[u8; 3]] {
        LATTICE[self.degree() - 1]
    }

    /// Barycentric coordinates of local node j.
    pub fn node_point(self, j: usize) -> [f64; 3] {
        let p = self.degree() as f64;
        self.lattice()[j].map(|i| i as f64 / p)
    }
}

/// Corner pairs of the three edges, in midpoint-node order.
pub const EDGES: [[usize; 2]; 3] = [[0, 1], [1, 2], [2, 0]];

/// Lattice indices of the nodes of each order, in node order. Edge (a, b)'s
/// node k (k = 1 .. p - 1) has index p - k on corner a and k on corner b.
pub const LATTICE: [&[[u8; 3]]; 4] = [
    &[[1, 0, 0], [0, 1, 0], [0, 0, 1]],
    &[[2, 0, 0], [0, 2, 0], [0, 0, 2], [1, 1, 0], [0, 1, 1], [1, 0, 1]],
    &[
        [3, 0, 0],
        [0, 3, 0],
        [0, 0, 3],
        [2, 1, 0],
        [1, 2, 0],
        [0, 2, 1],
        [0, 1, 2],
        [1, 0, 2],
        [2, 0, 1],
        [1, 1, 1],
    ],
    &[
        [4, 0, 0],
        [0, 4, 0],
        [0, 0, 4],
        [3, 1, 0],
        [2, 2, 0],
        [1, 3, 0],
        [0, 3, 1],
        [0, 2, 2],
        [0, 1, 3],
        [1, 0, 3],
        [2, 0, 2],
        [3, 0, 1],
        [2, 1, 1],
        [1, 2, 1],
        [1, 1, 2],
    ],
];

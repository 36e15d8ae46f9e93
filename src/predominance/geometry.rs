//! Plane geometry of a predominance diagram: affine functions of (pH, E), convex polygons whose
//! edges remember what cut them, and the clip of such a polygon by a half-plane.
//!
//! Points are (pH, E vs SHE in volts). Every region of a diagram is the window cut by one
//! half-plane per rival species, so a polygon is all the geometry needed; nothing is sampled.

/// An affine function `constant + per_ph·pH + per_volt·E`.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Affine {
    /// Value at pH 0, E = 0.
    pub constant: f64,
    /// Change per pH unit.
    pub per_ph: f64,
    /// Change per volt.
    pub per_volt: f64,
}

impl Affine {
    /// The value at a point.
    pub fn at(&self, ph: f64, e_volts: f64) -> f64 {
        self.constant + self.per_ph * ph + self.per_volt * e_volts
    }

    /// `self − other`.
    pub fn minus(&self, other: &Affine) -> Affine {
        Affine {
            constant: self.constant - other.constant,
            per_ph: self.per_ph - other.per_ph,
            per_volt: self.per_volt - other.per_volt,
        }
    }

    /// The line where the function is zero, or `None` when it is constant.
    pub fn zero_line(&self) -> Option<Line> {
        if self.per_volt != 0.0 {
            Some(Line::Sloped {
                intercept_volts: -self.constant / self.per_volt,
                volts_per_ph: -self.per_ph / self.per_volt,
            })
        } else if self.per_ph != 0.0 {
            Some(Line::Vertical {
                ph: -self.constant / self.per_ph,
            })
        } else {
            None
        }
    }
}

/// A straight line in the (pH, E) plane.
#[derive(Clone, Copy, Debug, PartialEq)]
pub enum Line {
    /// E = intercept + slope·pH (a boundary where electrons change hands).
    Sloped {
        /// E at pH 0, in volts.
        intercept_volts: f64,
        /// dE/dpH in volts.
        volts_per_ph: f64,
    },
    /// pH = constant (an acid–base boundary: no electrons change hands).
    Vertical {
        /// The pH.
        ph: f64,
    },
}

/// What made an edge of a polygon.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Edge {
    /// A side of the window: 0 bottom, 1 right, 2 top, 3 left.
    Window(u8),
    /// The boundary with this rival (an index into the diagram's species).
    Rival(usize),
}

/// A convex polygon, counter-clockwise; `edges[k]` made the edge from vertex k to vertex k + 1.
#[derive(Clone, Debug, PartialEq)]
pub struct Polygon {
    /// Vertices (pH, E).
    pub vertices: Vec<(f64, f64)>,
    /// What made each edge.
    pub edges: Vec<Edge>,
}

/// Points closer than this (in pH units and volts alike) are one point.
pub const SAME_POINT: f64 = 1e-9;

impl Polygon {
    /// A quadrilateral window from its four corners, counter-clockwise from bottom left.
    pub fn window(corners: [(f64, f64); 4]) -> Polygon {
        Polygon {
            vertices: corners.to_vec(),
            edges: (0..4).map(Edge::Window).collect(),
        }
    }

    /// Area by the shoelace formula (pH·V).
    pub fn area(&self) -> f64 {
        let n = self.vertices.len();
        (0..n)
            .map(|k| {
                let (x0, y0) = self.vertices[k];
                let (x1, y1) = self.vertices[(k + 1) % n];
                x0 * y1 - x1 * y0
            })
            .sum::<f64>()
            / 2.0
    }

    /// The centroid (area-weighted), inside a convex polygon.
    pub fn centroid(&self) -> (f64, f64) {
        let n = self.vertices.len();
        let (ox, oy) = self.vertices[0];
        let (mut cx, mut cy, mut twice) = (0.0, 0.0, 0.0);
        for k in 0..n {
            let (x0, y0) = self.vertices[k];
            let (x1, y1) = self.vertices[(k + 1) % n];
            let (x0, y0, x1, y1) = (x0 - ox, y0 - oy, x1 - ox, y1 - oy);
            let cross = x0 * y1 - x1 * y0;
            twice += cross;
            cx += (x0 + x1) * cross;
            cy += (y0 + y1) * cross;
        }
        if twice.abs() < f64::MIN_POSITIVE {
            return self.vertices[0];
        }
        (ox + cx / (3.0 * twice), oy + cy / (3.0 * twice))
    }

    /// True when the point is inside or on the boundary (within `tolerance` of every edge line).
    pub fn contains(&self, ph: f64, e: f64, tolerance: f64) -> bool {
        let n = self.vertices.len();
        (0..n).all(|k| {
            let (x0, y0) = self.vertices[k];
            let (x1, y1) = self.vertices[(k + 1) % n];
            let length = ((x1 - x0).powi(2) + (y1 - y0).powi(2)).sqrt();
            let cross = (x1 - x0) * (e - y0) - (y1 - y0) * (ph - x0);
            cross >= -tolerance * length
        })
    }

    /// The part where `f ≤ 0`; the new edge is labelled `cut`. Returns `None` when nothing of
    /// positive area is left.
    pub fn clipped(&self, f: &Affine, cut: Edge) -> Option<Polygon> {
        let n = self.vertices.len();
        let value = |p: (f64, f64)| f.at(p.0, p.1);
        let mut vertices = Vec::with_capacity(n + 1);
        let mut edges = Vec::with_capacity(n + 1);
        for k in 0..n {
            let p = self.vertices[k];
            let q = self.vertices[(k + 1) % n];
            let (fp, fq) = (value(p), value(q));
            let p_in = fp <= 0.0;
            let q_in = fq <= 0.0;
            let crossing = || {
                let t = fp / (fp - fq);
                (p.0 + t * (q.0 - p.0), p.1 + t * (q.1 - p.1))
            };
            match (p_in, q_in) {
                (true, true) => {
                    vertices.push(p);
                    edges.push(self.edges[k]);
                }
                (true, false) => {
                    vertices.push(p);
                    edges.push(self.edges[k]);
                    vertices.push(crossing());
                    edges.push(cut);
                }
                (false, true) => {
                    vertices.push(crossing());
                    edges.push(self.edges[k]);
                }
                (false, false) => {}
            }
        }
        let polygon = Polygon { vertices, edges }.without_repeats();
        (polygon.vertices.len() >= 3 && polygon.area() > SAME_POINT).then_some(polygon)
    }

    /// Drops a vertex equal to the next one (an edge of zero length), keeping the label of the
    /// edge that has a length.
    fn without_repeats(self) -> Polygon {
        let mut vertices: Vec<(f64, f64)> = Vec::with_capacity(self.vertices.len());
        let mut edges: Vec<Edge> = Vec::with_capacity(self.edges.len());
        for (v, e) in self.vertices.into_iter().zip(self.edges) {
            if let Some(last) = vertices.last()
                && same(*last, v)
            {
                // The previous vertex's edge has no length: this one's label is the real edge.
                *edges.last_mut().expect("one edge per vertex") = e;
                continue;
            }
            vertices.push(v);
            edges.push(e);
        }
        while vertices.len() > 1 && same(vertices[0], *vertices.last().expect("not empty")) {
            // The last vertex carried a zero-length edge to vertex 0: drop both.
            vertices.pop();
            edges.pop();
        }
        Polygon { vertices, edges }
    }
}

fn same(a: (f64, f64), b: (f64, f64)) -> bool {
    (a.0 - b.0).abs() < SAME_POINT && (a.1 - b.1).abs() < SAME_POINT
}

/// Where the zero lines of two affine functions cross, or `None` when they are parallel.
pub fn crossing(f: &Affine, g: &Affine) -> Option<(f64, f64)> {
    let det = f.per_ph * g.per_volt - f.per_volt * g.per_ph;
    if det.abs() < 1e-15 {
        return None;
    }
    let ph = (-f.constant * g.per_volt + f.per_volt * g.constant) / det;
    let e = (-f.per_ph * g.constant + f.constant * g.per_ph) / det;
    Some((ph, e))
}

#[cfg(test)]
mod tests {
    use super::*;

    fn square() -> Polygon {
        Polygon::window([(0.0, 0.0), (1.0, 0.0), (1.0, 1.0), (0.0, 1.0)])
    }

    #[test]
    fn a_cut_through_the_middle_halves_the_square_and_labels_the_new_edge() {
        // Keep E ≤ 0.5.
        let f = Affine {
            constant: -0.5,
            per_ph: 0.0,
            per_volt: 1.0,
        };
        let half = square().clipped(&f, Edge::Rival(7)).unwrap();
        assert!((half.area() - 0.5).abs() < 1e-12);
        assert!(half.edges.contains(&Edge::Rival(7)));
        assert!(!half.edges.contains(&Edge::Window(2)));
        let (cx, cy) = half.centroid();
        assert!((cx - 0.5).abs() < 1e-12 && (cy - 0.25).abs() < 1e-12);
    }

    #[test]
    fn a_cut_through_a_corner_leaves_no_zero_length_edge() {
        // Keep E ≤ pH: the diagonal from (0,0) to (1,1).
        let f = Affine {
            constant: 0.0,
            per_ph: -1.0,
            per_volt: 1.0,
        };
        let triangle = square().clipped(&f, Edge::Rival(1)).unwrap();
        assert_eq!(triangle.vertices.len(), 3, "{triangle:?}");
        assert_eq!(triangle.edges.len(), 3);
        assert!((triangle.area() - 0.5).abs() < 1e-12);
        assert!(triangle.contains(0.9, 0.1, 1e-12));
        assert!(!triangle.contains(0.1, 0.9, 1e-12));
    }

    #[test]
    fn nothing_left_and_crossings() {
        let f = Affine {
            constant: 5.0,
            per_ph: 0.0,
            per_volt: 0.0,
        };
        assert!(square().clipped(&f, Edge::Rival(0)).is_none());
        let a = Affine {
            constant: -1.0,
            per_ph: 1.0,
            per_volt: 0.0,
        };
        let b = Affine {
            constant: -2.0,
            per_ph: 0.0,
            per_volt: 1.0,
        };
        assert_eq!(crossing(&a, &b), Some((1.0, 2.0)));
        assert_eq!(crossing(&a, &a), None);
    }
}

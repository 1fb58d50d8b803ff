//! Gridding scattered picks onto the survey grid.
//!
//! [`grid_picks`] puts a depth on every map node (inline, crossline) of the survey:
//! natural-neighbour (Sibson) interpolation inside the convex hull of the picks,
//! trend extrapolation outside it. The result is a [`Surface`]: depth in m TVDSS
//! (positive down) on the node grid, evaluated between nodes by bilinear
//! interpolation ([`Surface::z_at_xy`]).
//!
//! All geometry is done in grid-aligned metre coordinates with the origin at node
//! (0, 0): `u = j * xline_spacing`, `v = i * inline_spacing`. This is a rotation
//! and a translation of world (x, y), so distances, the Delaunay triangulation and
//! the Sibson coordinates are the same as in world coordinates, for any azimuth;
//! working near the origin keeps large world coordinates (UTM eastings and
//! northings) from costing precision.

use crate::error::{Error, Result};
use crate::grid::SurveyGrid;
use crate::ingest::picks::Picks;
use ndarray::Array2;
use spade::{DelaunayTriangulation, FloatTriangulation, HasPosition, Point2, Triangulation};
use std::collections::HashMap;
use std::path::PathBuf;

/// A horizon on the survey's map grid.
#[derive(Debug, Clone)]
pub struct Surface {
    /// Horizon name.
    pub name: String,
    /// Depth at each node, m TVDSS positive down; shape `[inline_count, xline_count]`,
    /// indexed `[i, j]` (inline index, crossline index, from 0).
    pub z: Array2<f64>,
}

/// Position of a map node, for reports.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct NodeLocation {
    /// Inline number.
    pub inline: i32,
    /// Crossline number.
    pub xline: i32,
    /// World x, m.
    pub x: f64,
    /// World y, m.
    pub y: f64,
}

impl NodeLocation {
    /// The location of node (i, j) of `grid`.
    pub fn of_node(grid: &SurveyGrid, i: usize, j: usize) -> Self {
        let (x, y) = grid.node_xy(i as f64, j as f64);
        NodeLocation {
            inline: grid.inline_number(i),
            xline: grid.xline_number(j),
            x,
            y,
        }
    }
}

/// The bilinear stencil of world point (x, y): the four nodes `(i, j, weight)` of
/// the grid cell that holds the point, weights summing to 1.
///
/// With fractional indices `(fi, fj)` from [`SurveyGrid::xy_to_ij`],
/// `i0 = floor(fi)`, `t = fi - i0`, `j0 = floor(fj)`, `s = fj - j0`:
///
/// ```text
/// z(x, y) = (1-t)(1-s) z[i0, j0] + (1-t) s z[i0, j0+1] + t (1-s) z[i0+1, j0] + t s z[i0+1, j0+1]
/// ```
///
/// (bilinear interpolation on a rectangle; e.g. Press et al., Numerical Recipes,
/// 3rd ed. 2007, section 3.6). Points on the last inline or crossline use the cell
/// before it. `None` when the point lies outside the outer nodes by more than
/// 1e-9 of a cell (rounding of the coordinate transform is forgiven), or when the
/// grid has fewer than two nodes along an axis.
pub fn bilinear_stencil(grid: &SurveyGrid, x: f64, y: f64) -> Option<[(usize, usize, f64); 4]> {
    let ni = grid.inline_count;
    let nj = grid.xline_count;
    if ni < 2 || nj < 2 {
        return None;
    }
    let (fi, fj) = grid.xy_to_ij(x, y);
    if !fi.is_finite() || !fj.is_finite() {
        return None;
    }
    const TOL: f64 = 1e-9;
    let li = (ni - 1) as f64;
    let lj = (nj - 1) as f64;
    if fi < -TOL || fj < -TOL || fi > li + TOL || fj > lj + TOL {
        return None;
    }
    let fi = fi.clamp(0.0, li);
    let fj = fj.clamp(0.0, lj);
    let i0 = (fi.floor() as usize).min(ni - 2);
    let j0 = (fj.floor() as usize).min(nj - 2);
    let t = fi - i0 as f64;
    let s = fj - j0 as f64;
    Some([
        (i0, j0, (1.0 - t) * (1.0 - s)),
        (i0, j0 + 1, (1.0 - t) * s),
        (i0 + 1, j0, t * (1.0 - s)),
        (i0 + 1, j0 + 1, t * s),
    ])
}

impl Surface {
    /// A surface named `name` with node depths `z` (m TVDSS, shape
    /// `[inline_count, xline_count]`).
    pub fn new(name: impl Into<String>, z: Array2<f64>) -> Self {
        Surface {
            name: name.into(),
            z,
        }
    }

    /// Whether the node array has the shape of `grid`'s map.
    pub fn fits(&self, grid: &SurveyGrid) -> bool {
        self.z.dim() == (grid.inline_count, grid.xline_count)
    }

    /// Depth at node (i, j), m TVDSS; `None` outside the array.
    pub fn z_at_node(&self, i: usize, j: usize) -> Option<f64> {
        self.z.get((i, j)).copied()
    }

    /// Depth at world point (x, y), m TVDSS, by bilinear interpolation of the four
    /// surrounding nodes (formula in [`bilinear_stencil`]). `None` outside the grid
    /// or when the surface does not have the grid's shape.
    pub fn z_at_xy(&self, grid: &SurveyGrid, x: f64, y: f64) -> Option<f64> {
        if !self.fits(grid) {
            return None;
        }
        let st = bilinear_stencil(grid, x, y)?;
        let mut z = 0.0;
        for (i, j, w) in st {
            z += w * self.z_at_node(i, j)?;
        }
        Some(z)
    }
}

/// What [`grid_picks`] did, for the run summary.
#[derive(Debug, Clone, serde::Serialize)]
pub struct GriddingReport {
    /// Horizon name.
    pub name: String,
    /// The picks file.
    pub path: PathBuf,
    /// Picks used (after merging points closer than [`MERGE_DISTANCE`]).
    pub pick_count: usize,
    /// Picks merged into a neighbour closer than [`MERGE_DISTANCE`] (their z averaged).
    pub merged_close_picks: usize,
    /// Map nodes of the survey.
    pub nodes_total: usize,
    /// Nodes inside (or on) the convex hull of the picks: natural-neighbour interpolation.
    pub nodes_inside_hull: usize,
    /// Nodes outside the hull: trend extrapolation.
    pub nodes_extrapolated: usize,
    /// Nodes inside the hull where the natural-neighbour weights came out non-finite
    /// (round-off in near-degenerate configurations) and linear interpolation on the
    /// Delaunay triangle was used instead.
    pub nodes_linear_fallback: usize,
    /// Fraction of the survey's nodes inside the hull of the picks.
    pub hull_fraction: f64,
    /// Fraction of the survey's nodes with a pick within [`Self::hole_threshold`].
    pub covered_fraction: f64,
    /// Distance beyond which a node inside the hull counts as a hole: 2 grid spacings
    /// (the larger of the two), m.
    pub hole_threshold: f64,
    /// Nodes inside the hull whose nearest pick is farther than the threshold.
    pub hole_nodes: usize,
    /// Separate holes: groups of hole nodes connected along inlines and crosslines.
    pub hole_count: usize,
    /// Nodes of the largest hole.
    pub largest_hole_nodes: usize,
    /// Largest distance from a node inside the hull to its nearest pick, m.
    pub largest_gap: f64,
    /// Where [`Self::largest_gap`] occurs (`None` when no node is inside the hull).
    pub largest_gap_at: Option<NodeLocation>,
    /// Largest distance from an extrapolated node to the hull, m.
    pub max_extrapolation_distance: f64,
    /// Gradient of the least-squares trend plane, dz/dx and dz/dy in world
    /// coordinates (m/m, z positive down).
    pub trend_gradient: [f64; 2],
    /// Smallest and largest gridded depth, m TVDSS.
    pub z_range: [f64; 2],
    /// How nodes inside the hull were computed.
    pub interpolation_method: String,
    /// How nodes outside the hull were computed.
    pub extrapolation_method: String,
}

/// Picks closer than this (m) are merged into one point with their mean depth: two
/// depths a millimetre apart are a duplicate pick, not structure, and nearly
/// coincident points make the natural-neighbour weights lose precision.
pub const MERGE_DISTANCE: f64 = 1e-3;

/// A pick in grid-aligned coordinates.
#[derive(Debug, Clone, Copy)]
struct Node {
    pos: Point2<f64>,
    z: f64,
}

impl HasPosition for Node {
    type Scalar = f64;
    fn position(&self) -> Point2<f64> {
        self.pos
    }
}

/// Grid-aligned coordinates (u along increasing crossline, v along increasing
/// inline, metres from node (0, 0)) of world point (x, y).
fn to_local(grid: &SurveyGrid, x: f64, y: f64) -> (f64, f64) {
    let (i, j) = grid.xy_to_ij(x, y);
    (j * grid.xline_spacing, i * grid.inline_spacing)
}

/// Merge points closer than [`MERGE_DISTANCE`]; returns the points and how many were merged.
fn merge_close(points: &[(f64, f64, f64)]) -> (Vec<Node>, usize) {
    let cell = MERGE_DISTANCE;
    let key = |u: f64, v: f64| ((u / cell).floor() as i64, (v / cell).floor() as i64);
    let mut buckets: HashMap<(i64, i64), Vec<usize>> = HashMap::new();
    // representative position, z sum, count
    let mut reps: Vec<(f64, f64, f64, usize)> = Vec::with_capacity(points.len());
    let mut merged = 0usize;
    for &(u, v, z) in points {
        let (ku, kv) = key(u, v);
        let mut found = None;
        'search: for du in -1..=1 {
            for dv in -1..=1 {
                if let Some(list) = buckets.get(&(ku + du, kv + dv)) {
                    for &r in list {
                        if let Some(&(ru, rv, _, _)) = reps.get(r) {
                            if (ru - u).hypot(rv - v) < MERGE_DISTANCE {
                                found = Some(r);
                                break 'search;
                            }
                        }
                    }
                }
            }
        }
        match found.and_then(|r| reps.get_mut(r)) {
            Some(rep) => {
                rep.2 += z;
                rep.3 += 1;
                merged += 1;
            }
            None => {
                buckets.entry((ku, kv)).or_default().push(reps.len());
                reps.push((u, v, z, 1));
            }
        }
    }
    let nodes = reps
        .into_iter()
        .map(|(u, v, s, n)| Node {
            pos: Point2::new(u, v),
            z: s / n as f64,
        })
        .collect();
    (nodes, merged)
}

/// Gradient `(b, c)` of the least-squares plane `z = zm + b (u - um) + c (v - vm)`
/// through the points (`um, vm, zm` their means), or `None` when the points lie
/// (nearly) on a line.
///
/// Normal equations of the first-order trend surface on centred coordinates
/// (trend-surface analysis: Krumbein 1959; Davis, Statistics and Data Analysis in
/// Geology, 3rd ed. 2002, chapter 5):
/// `[Suu Suv; Suv Svv] [b c]' = [Suz Svz]'`.
fn trend_plane(nodes: &[Node]) -> Option<(f64, f64)> {
    let n = nodes.len() as f64;
    if nodes.len() < 3 {
        return None;
    }
    let (mut um, mut vm, mut zm) = (0.0, 0.0, 0.0);
    for p in nodes {
        um += p.pos.x;
        vm += p.pos.y;
        zm += p.z;
    }
    um /= n;
    vm /= n;
    zm /= n;
    let (mut suu, mut suv, mut svv, mut suz, mut svz) = (0.0, 0.0, 0.0, 0.0, 0.0);
    for p in nodes {
        let du = p.pos.x - um;
        let dv = p.pos.y - vm;
        let dz = p.z - zm;
        suu += du * du;
        suv += du * dv;
        svv += dv * dv;
        suz += du * dz;
        svz += dv * dz;
    }
    let m = nalgebra::Matrix2::new(suu, suv, suv, svv);
    let eig = m.symmetric_eigen();
    let (lmin, lmax) = (eig.eigenvalues.min(), eig.eigenvalues.max());
    if lmax.is_nan() || lmax <= 0.0 || lmin <= 1e-12 * lmax {
        return None;
    }
    let bc = m.lu().solve(&nalgebra::Vector2::new(suz, svz))?;
    Some((bc[0], bc[1]))
}

/// Nearest point of segment `a`-`b` to `p`: (point, parameter along the segment, distance).
fn nearest_on_segment(p: Point2<f64>, a: Point2<f64>, b: Point2<f64>) -> (Point2<f64>, f64, f64) {
    let (dx, dy) = (b.x - a.x, b.y - a.y);
    let len2 = dx * dx + dy * dy;
    let s = if len2 > 0.0 {
        (((p.x - a.x) * dx + (p.y - a.y) * dy) / len2).clamp(0.0, 1.0)
    } else {
        0.0
    };
    let q = Point2::new(a.x + s * dx, a.y + s * dy);
    (q, s, (p.x - q.x).hypot(p.y - q.y))
}

/// Grid horizon picks onto every map node of `grid`.
///
/// **Inside the convex hull of the picks**: natural-neighbour interpolation
/// (Sibson 1981, "A brief description of natural neighbour interpolation", in
/// Barnett (ed.), Interpreting Multivariate Data, Wiley, 21-36), the C0 interpolant
///
/// ```text
/// z(p) = sum_k  w_k(p) z_k,   w_k(p) = A(V(p) ∩ V_k) / A(V(p))
/// ```
///
/// where `V_k` is the Voronoi cell of pick k and `V(p)` the cell p would have if it
/// were inserted (the "stolen area" of each natural neighbour), computed by the
/// `spade` crate on the Delaunay triangulation of the picks. The interpolant honours
/// every pick, stays within the range of its natural neighbours, and has linear
/// precision: picks on a plane give exactly that plane (Sibson 1980, "A vector
/// identity for the Dirichlet tessellation", Math. Proc. Camb. Phil. Soc. 87). Holes
/// in the picks (a fault shadow, a gap in the interpretation) lie inside the hull,
/// so the triangulation spans them and they are filled by the same interpolant from
/// the picks around the hole; they are counted and located in the report. Should
/// the weights come out non-finite through round-off (near-degenerate circles), the
/// node falls back to linear interpolation on its Delaunay triangle, which also has
/// linear precision; such nodes are counted.
///
/// **Outside the hull**: trend extrapolation from the hull boundary,
///
/// ```text
/// z(p) = z_H(q) + g . (p - q)
/// ```
///
/// with `q` the nearest point of the hull boundary to `p`, `z_H(q)` the interpolant
/// there (on a hull edge Sibson's interpolant is linear between the edge's two picks),
/// and `g` the gradient of the first-order least-squares trend surface of all picks
/// (trend-surface analysis, Krumbein 1959; Davis, Statistics and Data Analysis in
/// Geology, 3rd ed. 2002, chapter 5). The surface is continuous across the hull
/// (projection onto a convex set is continuous and `q = p` on the boundary), carries
/// the regional dip outward instead of flattening or amplifying local curvature,
/// and reproduces a planar horizon exactly everywhere.
///
/// The report counts nodes inside/outside the hull, the coverage, holes (nodes
/// inside the hull whose nearest pick is farther than 2 grid spacings) and the
/// largest gap. Errors when fewer than 3 picks remain or they lie on one line
/// (naming the picks file), or when the grid is not valid.
pub fn grid_picks(
    name: &str,
    picks: &Picks,
    grid: &SurveyGrid,
) -> Result<(Surface, GriddingReport)> {
    let finite = [
        grid.inline_spacing,
        grid.xline_spacing,
        grid.azimuth,
        grid.x0,
        grid.y0,
    ]
    .iter()
    .all(|v| v.is_finite());
    if !finite || grid.inline_spacing <= 0.0 || grid.xline_spacing <= 0.0 {
        return Err(Error::inconsistent(format!(
            "cannot grid horizon {name}: the survey grid's origin, azimuth and spacings must be \
             finite and the spacings positive"
        )));
    }
    let ni = grid.inline_count;
    let nj = grid.xline_count;
    if ni == 0 || nj == 0 {
        return Err(Error::inconsistent(format!(
            "cannot grid horizon {name}: the survey grid has no map nodes"
        )));
    }
    let mut local = Vec::with_capacity(picks.points.len());
    for p in &picks.points {
        if !(p[0].is_finite() && p[1].is_finite() && p[2].is_finite()) {
            return Err(Error::input(
                &picks.path,
                None,
                format!(
                    "horizon {name}: pick ({}, {}, {}) is not finite",
                    p[0], p[1], p[2]
                ),
            ));
        }
        let (u, v) = to_local(grid, p[0], p[1]);
        local.push((u, v, p[2]));
    }
    let (nodes, merged) = merge_close(&local);
    let distinct = nodes.len();
    let too_few =
        || {
            Error::input(
                &picks.path,
                None,
                format!(
                "horizon {name}: at least 3 picks not on one line are needed to grid a surface, \
                 found {} distinct pick{}{}",
                distinct,
                if distinct == 1 { "" } else { "s" },
                if distinct >= 3 { " all on (nearly) one line" } else { "" }
            ),
            )
        };
    let Some((gb, gc)) = trend_plane(&nodes) else {
        return Err(too_few());
    };
    let pick_count = nodes.len();
    let tri = DelaunayTriangulation::<Node>::bulk_load_stable(nodes).map_err(|e| {
        Error::input(
            &picks.path,
            None,
            format!("horizon {name}: cannot triangulate the picks: {e}"),
        )
    })?;
    if tri.num_vertices() < 3 || tri.all_vertices_on_line() || tri.num_inner_faces() == 0 {
        return Err(too_few());
    }

    // hull edges with the depths at their ends
    let hull: Vec<(Point2<f64>, f64, Point2<f64>, f64)> = tri
        .convex_hull()
        .map(|e| {
            let [a, b] = e.vertices();
            (a.position(), a.data().z, b.position(), b.data().z)
        })
        .collect();

    let nn = tri.natural_neighbor();
    let bary = tri.barycentric();
    let mut z = Array2::<f64>::zeros((ni, nj));
    let mut inside = Array2::<bool>::from_elem((ni, nj), false);
    let mut nodes_inside = 0usize;
    let mut fallback = 0usize;
    let mut max_extrap = 0.0f64;
    for i in 0..ni {
        for j in 0..nj {
            let p = Point2::new(
                j as f64 * grid.xline_spacing,
                i as f64 * grid.inline_spacing,
            );
            let value = match nn.interpolate(|v| v.data().z, p) {
                Some(val) if val.is_finite() => {
                    nodes_inside += 1;
                    inside[(i, j)] = true;
                    Some(val)
                }
                Some(_) => match bary.interpolate(|v| v.data().z, p) {
                    Some(val) if val.is_finite() => {
                        nodes_inside += 1;
                        fallback += 1;
                        inside[(i, j)] = true;
                        Some(val)
                    }
                    _ => None,
                },
                None => None,
            };
            let value = match value {
                Some(v) => v,
                None => {
                    let mut best: Option<(f64, Point2<f64>, f64)> = None;
                    for &(a, za, b, zb) in &hull {
                        let (q, s, d) = nearest_on_segment(p, a, b);
                        if best.map_or(true, |(bd, _, _)| d < bd) {
                            best = Some((d, q, za + s * (zb - za)));
                        }
                    }
                    let Some((d, q, zq)) = best else {
                        return Err(too_few());
                    };
                    max_extrap = max_extrap.max(d);
                    zq + gb * (p.x - q.x) + gc * (p.y - q.y)
                }
            };
            z[(i, j)] = value;
        }
    }

    // coverage and holes
    let hole_threshold = 2.0 * grid.inline_spacing.max(grid.xline_spacing);
    let mut covered = 0usize;
    let mut hole = Array2::<bool>::from_elem((ni, nj), false);
    let mut hole_nodes = 0usize;
    let mut largest_gap = 0.0f64;
    let mut largest_gap_at = None;
    for i in 0..ni {
        for j in 0..nj {
            let p = Point2::new(
                j as f64 * grid.xline_spacing,
                i as f64 * grid.inline_spacing,
            );
            let d = tri
                .nearest_neighbor(p)
                .map(|v| {
                    let q = v.position();
                    (p.x - q.x).hypot(p.y - q.y)
                })
                .unwrap_or(f64::INFINITY);
            if d <= hole_threshold {
                covered += 1;
            }
            if inside[(i, j)] {
                if d > hole_threshold {
                    hole[(i, j)] = true;
                    hole_nodes += 1;
                }
                if largest_gap_at.is_none() || d > largest_gap {
                    largest_gap = d;
                    largest_gap_at = Some((i, j));
                }
            }
        }
    }
    let (hole_count, largest_hole_nodes) = connected_groups(&hole);

    let total = ni * nj;
    let (zmin, zmax) = z
        .iter()
        .fold((f64::INFINITY, f64::NEG_INFINITY), |(a, b), &v| {
            (a.min(v), b.max(v))
        });
    // gradient (b, c) in (u, v) back to world x, y: u = (x - x0) sin az + (y - y0) cos az,
    // v = (x - x0) cos az - (y - y0) sin az
    let (s, c) = grid.azimuth.to_radians().sin_cos();
    let trend_gradient = [gb * s + gc * c, gb * c - gc * s];
    let report = GriddingReport {
        name: name.to_string(),
        path: picks.path.clone(),
        pick_count,
        merged_close_picks: merged,
        nodes_total: total,
        nodes_inside_hull: nodes_inside,
        nodes_extrapolated: total - nodes_inside,
        nodes_linear_fallback: fallback,
        hull_fraction: nodes_inside as f64 / total as f64,
        covered_fraction: covered as f64 / total as f64,
        hole_threshold,
        hole_nodes,
        hole_count,
        largest_hole_nodes,
        largest_gap,
        largest_gap_at: largest_gap_at.map(|(i, j)| NodeLocation::of_node(grid, i, j)),
        max_extrapolation_distance: max_extrap,
        trend_gradient,
        z_range: [zmin, zmax],
        interpolation_method: "natural-neighbour (Sibson 1981) interpolation inside the convex \
                               hull of the picks"
            .to_string(),
        extrapolation_method: "value at the nearest point of the hull plus the gradient of the \
                               least-squares trend plane of all picks times the distance vector"
            .to_string(),
    };
    Ok((Surface::new(name, z), report))
}

/// Groups of `true` cells connected along rows and columns: (number of groups,
/// size of the largest).
fn connected_groups(mask: &Array2<bool>) -> (usize, usize) {
    let (ni, nj) = mask.dim();
    let mut seen = Array2::<bool>::from_elem((ni, nj), false);
    let mut groups = 0usize;
    let mut largest = 0usize;
    let mut stack = Vec::new();
    for i0 in 0..ni {
        for j0 in 0..nj {
            if !mask[(i0, j0)] || seen[(i0, j0)] {
                continue;
            }
            groups += 1;
            let mut size = 0usize;
            seen[(i0, j0)] = true;
            stack.push((i0, j0));
            while let Some((i, j)) = stack.pop() {
                size += 1;
                let mut visit = |a: usize, b: usize| {
                    if a < ni && b < nj && mask[(a, b)] && !seen[(a, b)] {
                        seen[(a, b)] = true;
                        stack.push((a, b));
                    }
                };
                visit(i + 1, j);
                visit(i, j + 1);
                if i > 0 {
                    visit(i - 1, j);
                }
                if j > 0 {
                    visit(i, j - 1);
                }
            }
            largest = largest.max(size);
        }
    }
    (groups, largest)
}

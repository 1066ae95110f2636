//! The parsed post-processing view format (`.pos`) as a background size field, and a small
//! reader of that syntax for checks.
//!
//! The size field goes on the corner nodes of simplices, the only elements a mesher's
//! background lookup interpolates linearly everywhere: triangles as `ST`, tetrahedra as `SS`.
//! Quadrilaterals, hexahedra and wedges are split into simplices by a rule that depends only on
//! global node ids, so two elements sharing a face split it the same way and the field is
//! continuous: an element is split by "pulling" from its corner with the smallest node id,
//! coning that corner to every facet not containing it, and each quadrilateral facet is cut by
//! the diagonal through its own smallest-id corner (the ordering idea of Dompierre, Labbé,
//! Vallet and Camarero 1999, "How to subdivide pyramids, prisms and hexahedra into
//! tetrahedra"). This gives 2 triangles per quadrilateral, 6 tetrahedra per hexahedron and 3
//! per wedge; every piece is positive for convex elements. Faces through the pulled corner are
//! cut through that corner, which is also their smallest-id corner, so they agree with the
//! neighbour's cut. Mid-side nodes are not used: the pieces are straight-sided.

use std::path::Path;

use super::error::IoError;
use super::text_out::{push_f64, write_chunked, NodeText};
use super::write_atomically;
use crate::element::ElementKind;
use crate::mesh::Mesh;

/// Most simplices one element is split into (hexahedra).
pub(crate) const MAX_PIECES: usize = 6;

/// Splits element `cell` of `kind` (VTK order, positive) into simplices of its corner nodes,
/// written as global node ids to `out` (triangles use the first 3 entries). Returns the count.
/// Each simplex is positively oriented when the element is convex: counter-clockwise triangles,
/// tetrahedra whose face (0, 1, 2) has its right-hand normal toward node 3.
pub(crate) fn split_into_simplices(
    kind: ElementKind,
    cell: &[u32],
    out: &mut [[u32; 4]; MAX_PIECES],
) -> usize {
    let nv = kind.vertex_count();
    let dim = kind.dim();
    if nv == dim + 1 {
        out[0] = [
            cell[0],
            cell[1],
            cell[2],
            if dim == 3 { cell[3] } else { 0 },
        ];
        return 1;
    }
    let smallest = |local: &[usize]| -> usize {
        let mut best = 0;
        for (i, &c) in local.iter().enumerate() {
            if cell[c] < cell[local[best]] {
                best = i;
            }
        }
        best
    };
    let all: [usize; 8] = [0, 1, 2, 3, 4, 5, 6, 7];
    let m = all[smallest(&all[..nv])];
    let mut count = 0;
    for facet in kind.facets() {
        let fc = facet.corners;
        if fc.contains(&m) {
            continue;
        }
        if dim == 2 {
            // The edge runs counter-clockwise, so (a, b, m) does too.
            out[count] = [cell[fc[0]], cell[fc[1]], cell[m], 0];
            count += 1;
            continue;
        }
        let k = fc.len();
        let i0 = smallest(fc);
        for j in 1..k - 1 {
            let (a, b, c) = (fc[i0], fc[(i0 + j) % k], fc[(i0 + j + 1) % k]);
            // (a, b, c) faces outward, so (a, c, b) faces the pulled corner.
            out[count] = [cell[a], cell[c], cell[b], cell[m]];
            count += 1;
        }
    }
    count
}

/// Writes the size field `sizes` (one target edge length per mesh node) of `mesh` as a `.pos`
/// view named `size_target`, atomically, refusing to overwrite `protect` (the input file).
///
/// One `ST` (2D) or `SS` (3D) statement per simplex of the split described in the module
/// documentation, with the sizes at its corners; 2D meshes are written at z = 0. Statements are
/// formatted in parallel chunks; numbers read back to the same `f64`.
pub fn write_pos_size_field(
    path: &Path,
    protect: Option<&Path>,
    mesh: &Mesh,
    sizes: &[f64],
) -> Result<(), IoError> {
    write_pos_text(path, protect, mesh, &NodeText::checked(path, mesh, sizes)?)
}

/// [`write_pos_size_field`] with the numbers already formatted and checked.
pub(crate) fn write_pos_text(
    path: &Path,
    protect: Option<&Path>,
    mesh: &Mesh,
    text: &NodeText,
) -> Result<(), IoError> {
    let three = mesh.dimension == 3;
    let mut zero = Vec::new();
    push_f64(&mut zero, 0.0);
    write_atomically(path, protect, |w| {
        w.write_all(b"View \"size_target\" {\n")?;
        for b in &mesh.blocks {
            let kind = b.kind;
            write_chunked(w, b.len(), |r, buf| {
                let mut pieces = [[0u32; 4]; MAX_PIECES];
                for i in r {
                    let n = split_into_simplices(kind, b.cell(i), &mut pieces);
                    for s in &pieces[..n] {
                        let corners = if three { &s[..] } else { &s[..3] };
                        buf.extend_from_slice(if three { b"SS(" } else { b"ST(" });
                        for (j, &v) in corners.iter().enumerate() {
                            if j > 0 {
                                buf.push(b',');
                            }
                            text.push_coord(buf, v, 0);
                            buf.push(b',');
                            text.push_coord(buf, v, 1);
                            buf.push(b',');
                            if three {
                                text.push_coord(buf, v, 2);
                            } else {
                                buf.extend_from_slice(&zero);
                            }
                        }
                        buf.extend_from_slice(b"){");
                        for (j, &v) in corners.iter().enumerate() {
                            if j > 0 {
                                buf.push(b',');
                            }
                            text.push_size(buf, v);
                        }
                        buf.extend_from_slice(b"};\n");
                    }
                }
            })?;
        }
        w.write_all(b"};\n")
    })
}

/// One statement of a view: an element with its node coordinates and values.
#[derive(Clone, Debug, PartialEq)]
pub struct PosEntry {
    /// The statement's two letters: value kind (`S` scalar, `V` vector, `T` tensor) then shape
    /// (`P` point, `L` line, `T` triangle, `Q` quadrangle, `S` tetrahedron, `H` hexahedron,
    /// `I` prism, `Y` pyramid), e.g. `ST`.
    pub kind: String,
    /// Node coordinates.
    pub coords: Vec<[f64; 3]>,
    /// Values as written: per time step, per node, per component.
    pub values: Vec<f64>,
}

/// A view of a `.pos` file.
#[derive(Clone, Debug, PartialEq)]
pub struct PosView {
    /// The view's name.
    pub name: String,
    /// Its statements, in file order.
    pub entries: Vec<PosEntry>,
}

/// Reads the first view of a `.pos` file (the parsed format with `View "name" { ... };`
/// blocks of `SP`/`ST`/`SQ`/`SS`/`SH`/`SI`/`SY`/`SL` statements and their vector and tensor
/// forms; `//` and `/* */` comments). Meant for checking written size fields: each entry is a
/// small heap object.
pub fn read_pos_view(path: &Path) -> Result<PosView, IoError> {
    let name = path.display().to_string();
    let bytes = std::fs::read(path).map_err(|source| IoError::Io {
        path: name.clone(),
        source,
    })?;
    let views = read_pos_views_bytes(&bytes, &name)?;
    views.into_iter().next().ok_or_else(|| IoError::Syntax {
        file: name,
        location: "whole file".into(),
        found: "no view".into(),
        expected: "View \"name\" { ... };".into(),
    })
}

/// Reads every view of a `.pos` file held in memory; `source_name` names it in messages.
pub fn read_pos_views_bytes(bytes: &[u8], source_name: &str) -> Result<Vec<PosView>, IoError> {
    let mut lx = Lexer {
        b: bytes,
        pos: 0,
        file: source_name,
    };
    let mut views = Vec::new();
    loop {
        let (at, tok) = lx.next()?;
        match tok {
            Tok::End => return Ok(views),
            Tok::Ident(w) if w == b"View" => {}
            t => return Err(lx.err(at, t.describe(), "View")),
        }
        let (at, tok) = lx.next()?;
        let Tok::Str(name) = tok else {
            return Err(lx.err(at, tok.describe(), "the view name in double quotes"));
        };
        let name = String::from_utf8_lossy(name).into_owned();
        lx.expect(b'{')?;
        let mut entries = Vec::new();
        loop {
            let (at, tok) = lx.next()?;
            let kind = match tok {
                Tok::Punct(b'}') => break,
                Tok::Ident(w) => w,
                t => {
                    return Err(lx.err(at, t.describe(), "a statement such as ST(...){...}; or }"))
                }
            };
            let Some((nodes, comps)) = shape(kind) else {
                return Err(lx.err(
                    at,
                    format!("statement '{}'", String::from_utf8_lossy(kind)),
                    "S, V or T followed by P, L, T, Q, S, H, I or Y",
                ));
            };
            lx.expect(b'(')?;
            let coords = lx.numbers(b')')?;
            lx.expect(b'{')?;
            let values = lx.numbers(b'}')?;
            lx.expect(b';')?;
            let kind = String::from_utf8_lossy(kind).into_owned();
            if coords.len() != 3 * nodes {
                return Err(lx.err(
                    at,
                    format!("{kind} with {} coordinates", coords.len()),
                    format!("{} (3 per node)", 3 * nodes),
                ));
            }
            let per_step = nodes * comps;
            if values.is_empty() || values.len() % per_step != 0 {
                return Err(lx.err(
                    at,
                    format!("{kind} with {} values", values.len()),
                    format!("a positive multiple of {per_step} ({nodes} nodes x {comps})"),
                ));
            }
            entries.push(PosEntry {
                kind,
                coords: coords.chunks_exact(3).map(|c| [c[0], c[1], c[2]]).collect(),
                values,
            });
        }
        lx.expect(b';')?;
        views.push(PosView { name, entries });
    }
}

/// Nodes and components of a statement name.
fn shape(kind: &[u8]) -> Option<(usize, usize)> {
    let [v, s] = kind else { return None };
    let comps = match v {
        b'S' => 1,
        b'V' => 3,
        b'T' => 9,
        _ => return None,
    };
    let nodes = match s {
        b'P' => 1,
        b'L' => 2,
        b'T' => 3,
        b'Q' | b'S' => 4,
        b'H' => 8,
        b'I' => 6,
        b'Y' => 5,
        _ => return None,
    };
    Some((nodes, comps))
}

enum Tok<'a> {
    End,
    Ident(&'a [u8]),
    Str(&'a [u8]),
    Num(f64),
    Punct(u8),
}

impl Tok<'_> {
    fn describe(&self) -> String {
        match self {
            Tok::End => "end of file".into(),
            Tok::Ident(w) => format!("'{}'", String::from_utf8_lossy(w)),
            Tok::Str(s) => format!("\"{}\"", String::from_utf8_lossy(s)),
            Tok::Num(v) => format!("number {v}"),
            Tok::Punct(c) => format!("'{}'", *c as char),
        }
    }
}

struct Lexer<'a> {
    b: &'a [u8],
    pos: usize,
    file: &'a str,
}

impl<'a> Lexer<'a> {
    fn err(&self, at: usize, found: impl Into<String>, expected: impl Into<String>) -> IoError {
        let line = self.b[..at.min(self.b.len())]
            .iter()
            .filter(|&&c| c == b'\n')
            .count()
            + 1;
        IoError::Syntax {
            file: self.file.to_string(),
            location: format!("line {line}"),
            found: found.into(),
            expected: expected.into(),
        }
    }

    /// Skips whitespace and comments.
    fn skip(&mut self) -> Result<(), IoError> {
        loop {
            while self.pos < self.b.len() && self.b[self.pos].is_ascii_whitespace() {
                self.pos += 1;
            }
            let rest = &self.b[self.pos..];
            if rest.starts_with(b"//") {
                let end = rest.iter().position(|&c| c == b'\n').unwrap_or(rest.len());
                self.pos += end;
            } else if rest.starts_with(b"/*") {
                match rest[2..].windows(2).position(|w| w == b"*/") {
                    Some(i) => self.pos += i + 4,
                    None => return Err(self.err(self.pos, "an unclosed /* comment", "*/")),
                }
            } else {
                return Ok(());
            }
        }
    }

    fn next(&mut self) -> Result<(usize, Tok<'a>), IoError> {
        self.skip()?;
        let at = self.pos;
        let Some(&c) = self.b.get(at) else {
            return Ok((at, Tok::End));
        };
        if c.is_ascii_alphabetic() || c == b'_' {
            let len = self.b[at..]
                .iter()
                .position(|c| !(c.is_ascii_alphanumeric() || *c == b'_'))
                .unwrap_or(self.b.len() - at);
            self.pos += len;
            return Ok((at, Tok::Ident(&self.b[at..at + len])));
        }
        if c == b'"' {
            let Some(len) = self.b[at + 1..].iter().position(|&c| c == b'"') else {
                return Err(self.err(at, "an unclosed string", "a closing \""));
            };
            self.pos = at + len + 2;
            return Ok((at, Tok::Str(&self.b[at + 1..at + 1 + len])));
        }
        if c.is_ascii_digit() || matches!(c, b'-' | b'+' | b'.') {
            let len = self.b[at..]
                .iter()
                .position(|c| !(c.is_ascii_alphanumeric() || matches!(c, b'-' | b'+' | b'.')))
                .unwrap_or(self.b.len() - at);
            self.pos += len;
            let text = &self.b[at..at + len];
            return std::str::from_utf8(text)
                .ok()
                .and_then(|s| s.parse::<f64>().ok())
                .map(|v| (at, Tok::Num(v)))
                .ok_or_else(|| {
                    self.err(
                        at,
                        format!("'{}'", String::from_utf8_lossy(text)),
                        "a number",
                    )
                });
        }
        self.pos += 1;
        Ok((at, Tok::Punct(c)))
    }

    fn expect(&mut self, want: u8) -> Result<(), IoError> {
        let (at, tok) = self.next()?;
        match tok {
            Tok::Punct(c) if c == want => Ok(()),
            t => Err(self.err(at, t.describe(), format!("'{}'", want as char))),
        }
    }

    /// Comma-separated numbers up to the closing `close`.
    fn numbers(&mut self, close: u8) -> Result<Vec<f64>, IoError> {
        let mut out = Vec::new();
        loop {
            let (at, tok) = self.next()?;
            match tok {
                Tok::Num(v) => out.push(v),
                Tok::Punct(c) if c == close && out.is_empty() => return Ok(out),
                t => return Err(self.err(at, t.describe(), "a number")),
            }
            let (at, tok) = self.next()?;
            match tok {
                Tok::Punct(b',') => {}
                Tok::Punct(c) if c == close => return Ok(out),
                t => return Err(self.err(at, t.describe(), format!("',' or '{}'", close as char))),
            }
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::element::jacobian_determinant;
    use crate::mesh::generate::structured;

    fn tet_volume(p: [[f64; 3]; 4]) -> f64 {
        let d = |a: [f64; 3], b: [f64; 3]| [b[0] - a[0], b[1] - a[1], b[2] - a[2]];
        let (u, v, w) = (d(p[0], p[1]), d(p[0], p[2]), d(p[0], p[3]));
        (u[0] * (v[1] * w[2] - v[2] * w[1]) - u[1] * (v[0] * w[2] - v[2] * w[0])
            + u[2] * (v[0] * w[1] - v[1] * w[0]))
            / 6.0
    }

    fn tri_area(p: [[f64; 3]; 3]) -> f64 {
        0.5 * ((p[1][0] - p[0][0]) * (p[2][1] - p[0][1])
            - (p[2][0] - p[0][0]) * (p[1][1] - p[0][1]))
    }

    /// Element measure by the corner kind's own quadrature (exact for straight-sided elements).
    fn measure(mesh: &Mesh, kind: ElementKind, cell: &[u32]) -> f64 {
        let table = kind.table(crate::element::TableRule::Full);
        let coords: Vec<[f64; 3]> = cell.iter().map(|&n| mesh.points[n as usize]).collect();
        (0..table.len())
            .map(|k| table.weights[k] * jacobian_determinant(kind.dim(), &coords, table.dn_at(k)))
            .sum()
    }

    /// Every element kind, with every relabelling of its corners' global ids that matters (a
    /// few permutations of the ids): pieces are positive and add up to the element.
    #[test]
    fn pieces_are_positive_and_fill_the_element() {
        for kind in ElementKind::ALL {
            let mut mesh = structured(kind, [1, 1, 1], [1.0, 2.0, 3.0]);
            // Shear the box so no piece is degenerate by symmetry.
            for p in &mut mesh.points {
                p[0] += 0.3 * p[1] + 0.1 * p[2];
                p[1] += 0.2 * p[2];
            }
            let n = mesh.node_count() as u32;
            for shift in [0u32, 1, 3, 5] {
                // Relabel node ids cyclically; coordinates follow, so geometry is unchanged.
                let relabel = |v: u32| (v + shift) % n;
                let mut points = mesh.points.clone();
                for (v, p) in mesh.points.iter().enumerate() {
                    points[relabel(v as u32) as usize] = *p;
                }
                let mut m2 = mesh.clone();
                m2.points = points;
                for b in &mut m2.blocks {
                    for v in &mut b.nodes {
                        *v = relabel(*v);
                    }
                }
                let mut pieces = [[0u32; 4]; MAX_PIECES];
                for e in 0..m2.element_count() {
                    let (k, cell) = m2.element(e);
                    let count = split_into_simplices(k, cell, &mut pieces);
                    let expected = match k.vertex_count() {
                        8 => 6,
                        6 => 3,
                        4 if k.dim() == 2 => 2,
                        _ => 1,
                    };
                    assert_eq!(count, expected, "{}", k.name());
                    let mut sum = 0.0;
                    for s in &pieces[..count] {
                        let p = s.map(|v| m2.points[v as usize]);
                        let vol = if k.dim() == 3 {
                            tet_volume(p)
                        } else {
                            tri_area([p[0], p[1], p[2]])
                        };
                        assert!(vol > 0.0, "{} piece {s:?} has measure {vol}", k.name());
                        sum += vol;
                    }
                    let whole = measure(&m2, k, cell);
                    // Round-off of a few products of O(1) coordinates.
                    assert!(
                        (sum - whole).abs() <= 1e-12 * whole,
                        "{}: {sum} vs {whole}",
                        k.name()
                    );
                }
            }
        }
    }

    /// Two hexahedra sharing a face cut it along the same diagonal, whatever their corner order.
    #[test]
    fn shared_faces_are_cut_alike() {
        let mesh = structured(ElementKind::Hex8, [3, 2, 2], [3.0, 2.0, 2.0]);
        use std::collections::HashMap;
        // Every triangle on a face between two elements must appear exactly twice.
        let mut faces: HashMap<[u32; 3], usize> = HashMap::new();
        let mut pieces = [[0u32; 4]; MAX_PIECES];
        for e in 0..mesh.element_count() {
            let (k, cell) = mesh.element(e);
            let n = split_into_simplices(k, cell, &mut pieces);
            for t in &pieces[..n] {
                for skip in 0..4 {
                    let mut f: Vec<u32> = (0..4).filter(|&i| i != skip).map(|i| t[i]).collect();
                    f.sort();
                    *faces.entry([f[0], f[1], f[2]]).or_default() += 1;
                }
            }
        }
        // A conforming tetrahedral mesh: each triangle is shared by at most two tetrahedra,
        // and the boundary triangles (count 1) cover the box surface: 2 (per quad) x quads.
        assert!(faces.values().all(|&c| c <= 2));
        let boundary = faces.values().filter(|&&c| c == 1).count();
        let quads = 2 * (3 * 2 + 3 * 2 + 2 * 2);
        assert_eq!(boundary, 2 * quads);
    }

    #[test]
    fn reads_statements_comments_and_steps() {
        let text = b"// size field\nView \"h\" {\n/* two\n lines */ SP(1,2,3){0.5};\n\
            ST(0,0,0, 1,0,0, 0,1,0){1,2,3, 4,5,6};\nVT(0,0,0,1,0,0,0,1,0){1,2,3,4,5,6,7,8,9};\n};\n";
        let views = read_pos_views_bytes(text, "t.pos").unwrap();
        assert_eq!(views.len(), 1);
        let v = &views[0];
        assert_eq!(v.name, "h");
        assert_eq!(v.entries.len(), 3);
        assert_eq!(v.entries[0].coords, vec![[1.0, 2.0, 3.0]]);
        assert_eq!(v.entries[1].values, vec![1.0, 2.0, 3.0, 4.0, 5.0, 6.0]);
        assert_eq!(v.entries[2].kind, "VT");
    }

    #[test]
    fn bad_statements_are_errors_not_panics() {
        let cases: &[&[u8]] = &[
            b"View \"h\" { ST(0,0,0){1}; };",
            b"View \"h\" { SX(0,0,0){1}; };",
            b"View \"h\" { ST(0,0,0, 1,0,0, 0,1,0){1,2}; };",
            b"View \"h\" { SP(0,0,0){1} };",
            b"View \"h\" { SP(0,0,0){1};",
            b"View \"h { SP(0,0,0){1}; };",
            b"View \"h\" { SP(0,0,abc){1}; };",
            b"/* open",
            b"Foo",
            b"View \"h\" { SP(0,0,0,){1}; };",
        ];
        for (i, c) in cases.iter().enumerate() {
            let r = read_pos_views_bytes(c, "bad.pos");
            let e = r.expect_err(&format!("case {i}"));
            let msg = e.to_string();
            assert!(msg.starts_with("bad.pos: line "), "{msg}");
        }
    }
}

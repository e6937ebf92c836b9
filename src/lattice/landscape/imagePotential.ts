// A potential picture (a DMD or SLM pattern, or a potential computed elsewhere on a square
// pixel grid) placed in the lattice plane and carried onto the sites.
//
// Image orientation: values[row * width + col], row 0 at the top, col 0 at the left, as image
// viewers show a PNG or numpy shows a 2D array a[row, col]. Columns run along the lattice's x
// axis and rows along its y axis: with no rotation, moving one column to the right moves +x by
// one pixel, one row down moves +y by one pixel (so the lattice's y axis points DOWN the
// picture as displayed). The image centre sits at `offset` (x, y) from the lattice centre;
// `angleRad` rotates the picture from +x towards +y about its centre. Pixel (row r, col c) is
// centred at image-frame coordinates u = (c + 1/2 - width/2) p, v = (r + 1/2 - height/2) p, and
// a lattice point (x, y) maps to u = cos(t) dx + sin(t) dy, v = -sin(t) dx + cos(t) dy with
// (dx, dy) = (x, y) - offset. Outside the picture's footprint the term is 0 (no light).
// 3D lattices: the picture acts in every x-y plane (uniform along z); a chain lies along x at y = 0.
//
// Resampling onto the sites:
// - bilinear: the bilinear interpolant between pixel centres at the site centre (inside the
//   footprint but beyond the outermost pixel centres the edge pixels are extended);
// - area: the mean over the site's cell (a_x by a_y about the site centre) of the picture as
//   uniform square pixels, by an n x n midpoint rule with n = max(4, ceil(4 a / p)) per axis
//   (at least four samples per pixel width; exact when pixel edges fall on the sample grid);
//   chains are averaged along x only;
// - auto: area when the pixel is smaller than the site along x or y, bilinear otherwise.

import { mapSites, type LatticeGeometry } from '../latticeGeometry.js';
import { ParameterError } from '../../physics/parameterError.js';
import { axisOffsets } from './axisOffsets.js';

export interface PotentialImage {
  /** row-major values, values[row * width + col] */
  values: Float64Array;
  width: number;
  height: number;
}

export type ImageResampling = 'auto' | 'bilinear' | 'area';

export interface ImagePlacement {
  /** side of one pixel in the length unit */
  pixelSize: number;
  /** image centre, offset (x, y) from the lattice centre, length unit */
  offset: readonly [number, number];
  /** rotation from +x towards +y, radians */
  angleRad: number;
  /** length unit per site along each lattice axis (1 for lattice sites) */
  lengthPerSite: readonly number[];
  /** multiplies every pixel value (energy per grey level, in the caller's energy unit) */
  scale: number;
  resampling: ImageResampling;
}

export interface ImagePotentialResult {
  siteEnergy: Float64Array;
  /** the resampling actually used */
  resampling: 'bilinear' | 'area';
  /** samples per site along x and y (area resampling; 1 for bilinear) */
  samplesPerSite: [number, number];
  /** sites whose centre lies inside the picture's footprint */
  sitesCovered: number;
}

/** Bilinear interpolation at fractional pixel position (colF, rowF); 0 outside the footprint. */
function bilinear(img: PotentialImage, colF: number, rowF: number): number {
  const W = img.width;
  const H = img.height;
  if (!(colF >= -0.5 && colF <= W - 0.5 && rowF >= -0.5 && rowF <= H - 0.5)) return 0;
  // Within half a pixel of the edge the value is held (no neighbour beyond to blend with).
  const cf = Math.floor(colF);
  const rf = Math.floor(rowF);
  const c0 = cf < 0 ? 0 : cf >= W - 1 ? W - 1 : cf;
  const r0 = rf < 0 ? 0 : rf >= H - 1 ? H - 1 : rf;
  const tc = c0 === cf && cf < W - 1 ? colF - cf : 0;
  const tr = r0 === rf && rf < H - 1 ? rowF - rf : 0;
  const c1 = c0 + 1 < W ? c0 + 1 : c0;
  const r1 = r0 + 1 < H ? r0 + 1 : r0;
  const v = img.values;
  const top = v[r0 * W + c0] * (1 - tc) + v[r0 * W + c1] * tc;
  const bottom = v[r1 * W + c0] * (1 - tc) + v[r1 * W + c1] * tc;
  return top * (1 - tr) + bottom * tr;
}

/** Value of the pixel containing fractional position (colF, rowF); 0 outside the footprint. */
function nearest(img: PotentialImage, colF: number, rowF: number): number {
  const c = Math.floor(colF + 0.5);
  const r = Math.floor(rowF + 0.5);
  if (c < 0 || c >= img.width || r < 0 || r >= img.height) return 0;
  return img.values[r * img.width + c];
}

function check(geometry: LatticeGeometry, img: PotentialImage, p: ImagePlacement): void {
  if (!Number.isInteger(img.width) || !Number.isInteger(img.height) || img.width < 1 || img.height < 1) {
    throw new ParameterError('image', `expected a picture of at least 1 x 1 pixels, got ${img.width} x ${img.height}`);
  }
  if (img.values.length !== img.width * img.height) {
    throw new ParameterError('image', `expected ${img.width * img.height} values (width x height), got ${img.values.length}`);
  }
  if (!(p.pixelSize > 0) || !Number.isFinite(p.pixelSize)) throw new ParameterError('pixelSize', `expected a positive length, got ${p.pixelSize}`);
  if (!Number.isFinite(p.angleRad)) throw new ParameterError('angle', `expected a finite angle, got ${p.angleRad}`);
  if (!Number.isFinite(p.scale)) throw new ParameterError('scale', `expected a finite number, got ${p.scale}`);
  if (p.offset.length !== 2 || !p.offset.every(Number.isFinite)) throw new ParameterError('offset', 'expected two finite numbers (x, y)');
  if (p.lengthPerSite.length !== geometry.dims) {
    throw new ParameterError('lengthPerSite', `expected ${geometry.dims} values, got ${p.lengthPerSite.length}`);
  }
}

/** Site energies of a placed picture (flat C order); see the file header for the conventions. */
export function imagePotential(geometry: LatticeGeometry, img: PotentialImage, p: ImagePlacement): ImagePotentialResult {
  check(geometry, img, p);
  const dims = geometry.dims;
  const pad = 3 - dims;
  const offsets = axisOffsets(geometry, p.lengthPerSite);
  const ax = p.lengthPerSite[0];
  const ay = dims >= 2 ? p.lengthPerSite[1] : 0;
  const mode: 'bilinear' | 'area' =
    p.resampling === 'auto' ? (p.pixelSize < ax || (dims >= 2 && p.pixelSize < ay) ? 'area' : 'bilinear') : p.resampling;
  const samples = (a: number): number => Math.min(256, Math.max(4, Math.ceil((4 * a) / p.pixelSize)));
  const nx = mode === 'area' ? samples(ax) : 1;
  const ny = mode === 'area' && dims >= 2 ? samples(ay) : 1;
  const cos = Math.cos(p.angleRad);
  const sin = Math.sin(p.angleRad);
  const inv = 1 / p.pixelSize;
  const colShift = img.width / 2 - 0.5;
  const rowShift = img.height / 2 - 0.5;
  const [ox, oy] = p.offset;
  // Per-coordinate x and y of the internal axes (tables of one 0 where absent).
  const xTable = offsets[0];
  const yTable = dims >= 2 ? offsets[1] : new Float64Array(1);
  const ix = pad;
  const iy = dims >= 2 ? pad + 1 : -1;
  let covered = 0;
  const out = mapSites(geometry, (q) => {
    const x = xTable[q[ix]] - ox;
    const y = (iy >= 0 ? yTable[q[iy]] : 0) - oy;
    const uc = (cos * x + sin * y) * inv + colShift;
    const vc = (-sin * x + cos * y) * inv + rowShift;
    if (uc >= -0.5 && uc <= img.width - 0.5 && vc >= -0.5 && vc <= img.height - 0.5) covered++;
    let value: number;
    if (mode === 'bilinear') value = bilinear(img, uc, vc);
    else {
      let sum = 0;
      for (let sy = 0; sy < ny; sy++) {
        const dy = ny === 1 ? 0 : ((sy + 0.5) / ny - 0.5) * ay;
        for (let sx = 0; sx < nx; sx++) {
          const dx = ((sx + 0.5) / nx - 0.5) * ax;
          sum += nearest(img, uc + (cos * dx + sin * dy) * inv, vc + (-sin * dx + cos * dy) * inv);
        }
      }
      value = sum / (nx * ny);
    }
    return p.scale * value;
  });
  return { siteEnergy: out, resampling: mode, samplesPerSite: [nx, ny], sitesCovered: covered };
}

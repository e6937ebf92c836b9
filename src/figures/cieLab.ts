// Colour science for choosing and checking colours: sRGB <-> CIE 1976 L*a*b*.
//
// sRGB: IEC 61966-2-1:1999. Transfer function (encoded value V in [0,1] to linear light):
//   V <= 0.04045 : V / 12.92,   otherwise ((V + 0.055) / 1.055)^2.4
// Linear sRGB to CIE XYZ (D65 white, Y of white = 1) with the standard's 4-decimal matrix:
//   X = 0.4124 R + 0.3576 G + 0.1805 B
//   Y = 0.2126 R + 0.7152 G + 0.0722 B
//   Z = 0.0193 R + 0.1192 G + 0.9505 B
// and the standard's inverse matrix for the way back.
// CIELAB: CIE 15:2004 (Colorimetry), section 8.2.1:
//   L* = 116 f(Y/Yn) - 16,  a* = 500 [f(X/Xn) - f(Y/Yn)],  b* = 200 [f(Y/Yn) - f(Z/Zn)],
//   f(t) = t^(1/3) for t > (6/29)^3, else t / (3 (6/29)^2) + 4/29.
// The reference white (Xn, Yn, Zn) is the image of sRGB white through the matrix above
// (its row sums), so that sRGB white lands exactly on a* = b* = 0.
// Colour difference: CIE 1976 Delta E*ab, the Euclidean distance in L*a*b*.

/** An sRGB colour with encoded (gamma-corrected) components in [0, 1]. */
export type Rgb = readonly [number, number, number];

/** A colour in CIE 1976 L*a*b* (L* from 0 for black to 100 for the reference white). */
export interface Lab {
  L: number;
  a: number;
  b: number;
}

const whiteX = 0.4124 + 0.3576 + 0.1805;
const whiteY = 0.2126 + 0.7152 + 0.0722;
const whiteZ = 0.0193 + 0.1192 + 0.9505;

const epsilon = (6 / 29) ** 3;

/** IEC 61966-2-1 decoding: encoded sRGB component in [0, 1] to linear light. */
export function srgbToLinear(encoded: number): number {
  return encoded <= 0.04045 ? encoded / 12.92 : ((encoded + 0.055) / 1.055) ** 2.4;
}

/** IEC 61966-2-1 encoding: linear light in [0, 1] to encoded sRGB component. */
export function linearToSrgb(linear: number): number {
  return linear <= 0.0031308 ? 12.92 * linear : 1.055 * linear ** (1 / 2.4) - 0.055;
}

function labF(t: number): number {
  return t > epsilon ? Math.cbrt(t) : t / (3 * (6 / 29) ** 2) + 4 / 29;
}

function labFInverse(f: number): number {
  return f > 6 / 29 ? f * f * f : 3 * (6 / 29) ** 2 * (f - 4 / 29);
}

/** CIE 1976 lightness L* of an sRGB colour (components in [0, 1]). */
export function srgbLightness(rgb: Rgb): number {
  const y = 0.2126 * srgbToLinear(rgb[0]) + 0.7152 * srgbToLinear(rgb[1]) + 0.0722 * srgbToLinear(rgb[2]);
  return 116 * labF(y / whiteY) - 16;
}

/** sRGB (components in [0, 1]) to CIE L*a*b*. */
export function srgbToLab(rgb: Rgb): Lab {
  const r = srgbToLinear(rgb[0]);
  const g = srgbToLinear(rgb[1]);
  const b = srgbToLinear(rgb[2]);
  const fx = labF((0.4124 * r + 0.3576 * g + 0.1805 * b) / whiteX);
  const fy = labF((0.2126 * r + 0.7152 * g + 0.0722 * b) / whiteY);
  const fz = labF((0.0193 * r + 0.1192 * g + 0.9505 * b) / whiteZ);
  return { L: 116 * fy - 16, a: 500 * (fx - fy), b: 200 * (fy - fz) };
}

/** Linear-light sRGB components of a L*a*b* colour; components may fall outside [0, 1]. */
export function labToLinearRgb(lab: Lab): Rgb {
  const fy = (lab.L + 16) / 116;
  const x = whiteX * labFInverse(fy + lab.a / 500);
  const y = whiteY * labFInverse(fy);
  const z = whiteZ * labFInverse(fy - lab.b / 200);
  return [
    3.2406 * x - 1.5372 * y - 0.4986 * z,
    -0.9689 * x + 1.8758 * y + 0.0415 * z,
    0.0557 * x - 0.204 * y + 1.057 * z,
  ];
}

/** Whether a L*a*b* colour is displayable in sRGB (with a small tolerance for rounding). */
export function labInSrgbGamut(lab: Lab): boolean {
  const lin = labToLinearRgb(lab);
  const tol = 1e-9;
  return lin.every((c) => c >= -tol && c <= 1 + tol);
}

/** L*a*b* to encoded sRGB in [0, 1]; out-of-gamut components are clipped. */
export function labToSrgb(lab: Lab): Rgb {
  const lin = labToLinearRgb(lab);
  return [
    linearToSrgb(Math.min(1, Math.max(0, lin[0]))),
    linearToSrgb(Math.min(1, Math.max(0, lin[1]))),
    linearToSrgb(Math.min(1, Math.max(0, lin[2]))),
  ];
}

/** CIE 1976 colour difference Delta E*ab between two L*a*b* colours. */
export function deltaE76(p: Lab, q: Lab): number {
  return Math.hypot(p.L - q.L, p.a - q.a, p.b - q.b);
}

/**
 * The displayable L*a*b* colour of given lightness and hue angle (degrees, measured from
 * +a* towards +b*) with the largest chroma not above `chroma`. Reducing only the chroma
 * keeps L* exactly, which is what a lightness-ordered colour scale needs. Bisection:
 * at fixed L* in (0, 100) the grey axis (chroma 0) is always inside the gamut.
 */
export function labWithinGamut(lightness: number, chroma: number, hueDeg: number): Lab {
  const h = (hueDeg * Math.PI) / 180;
  const at = (c: number): Lab => ({ L: lightness, a: c * Math.cos(h), b: c * Math.sin(h) });
  if (labInSrgbGamut(at(chroma))) return at(chroma);
  let lo = 0;
  let hi = chroma;
  for (let i = 0; i < 50; i++) {
    const mid = 0.5 * (lo + hi);
    if (labInSrgbGamut(at(mid))) lo = mid;
    else hi = mid;
  }
  return at(lo);
}

// An RGBA8 raster with the few drawing operations our figures need.
//
// Pixel (i, j) covers the square [i, i+1) x [j, j+1); j grows downwards. Rectangles and
// text snap to whole pixels (crisp axes, ticks and glyphs). Lines and circles are
// anti-aliased by area coverage estimated from the distance of the pixel centre to the
// shape: coverage = clamp(halfWidth + 1/2 - distance, 0, 1), exact for an axis-aligned
// edge and within a few per cent for any other. A polyline first collects the maximum
// coverage over all of its segments and then blends once, so joints are not painted twice.
// Blending is the usual "over" operator on 8-bit sRGB values with an opaque background.
// Every operation respects a clip rectangle.

import { fontCellRows, forEachInkedPixel, measureText, type TextMetrics } from './bitmapFont.js';

/** An 8-bit sRGB colour. */
export type Rgb8 = readonly [number, number, number];

export const black: Rgb8 = [0, 0, 0];
export const white: Rgb8 = [255, 255, 255];

/** The plain data of an RGBA8 image: rows top to bottom, 4 bytes per pixel. */
export interface RgbaImage {
  width: number;
  height: number;
  data: Uint8Array;
}

export interface StrokeStyle {
  color: Rgb8;
  /** Line width in pixels (default 1). */
  widthPx?: number;
  /** Opacity in [0, 1] (default 1). */
  alpha?: number;
  /** Dash pattern in pixels: on, off, on, off, ... (default: solid). */
  dashPx?: readonly number[];
}

export type TextAnchor = 'start' | 'middle' | 'end';
export type TextBaseline = 'top' | 'middle' | 'alphabetic' | 'bottom';

export interface TextStyle {
  color?: Rgb8;
  /** Integer scale of the bitmap font (default 1). */
  scale?: number;
  /** Which point of the line of text lies at the given position along the text direction. */
  anchor?: TextAnchor;
  /** Which line across the text lies at the given position: cell top, middle of the capitals, baseline or cell bottom. */
  baseline?: TextBaseline;
  /** 0: left to right; 90: rotated counter-clockwise, reading bottom to top (vertical axis labels). */
  rotation?: 0 | 90;
  /** Draw a one-pixel outline of this colour first, to keep text readable over an image. */
  halo?: Rgb8;
}

/** Axis-aligned box in pixels. */
export interface PixelBox {
  x: number;
  y: number;
  width: number;
  height: number;
}

const pixelBytes = new Uint8Array(4);
const pixelWord = new Uint32Array(pixelBytes.buffer);

export class Raster implements RgbaImage {
  readonly width: number;
  readonly height: number;
  readonly data: Uint8Array;
  /** The same pixels as 32-bit words, for fast fills and copies. */
  private readonly words: Uint32Array;
  private clipX0 = 0;
  private clipY0 = 0;
  private clipX1: number;
  private clipY1: number;

  constructor(width: number, height: number, background: Rgb8 = white) {
    if (!Number.isInteger(width) || !Number.isInteger(height) || width < 1 || height < 1) {
      throw new Error(`raster size: expected positive integers, got ${width} x ${height}`);
    }
    this.width = width;
    this.height = height;
    this.data = new Uint8Array(width * height * 4);
    this.words = new Uint32Array(this.data.buffer);
    this.clipX1 = width;
    this.clipY1 = height;
    this.fillRect(0, 0, width, height, background);
  }

  /** Restrict drawing to a rectangle (intersected with the raster). */
  setClip(x: number, y: number, width: number, height: number): void {
    this.clipX0 = Math.max(0, Math.floor(x));
    this.clipY0 = Math.max(0, Math.floor(y));
    this.clipX1 = Math.min(this.width, Math.floor(x + width));
    this.clipY1 = Math.min(this.height, Math.floor(y + height));
  }

  /** Allow drawing on the whole raster again. */
  resetClip(): void {
    this.clipX0 = 0;
    this.clipY0 = 0;
    this.clipX1 = this.width;
    this.clipY1 = this.height;
  }

  /** The colour of pixel (x, y) (alpha is always 255). */
  getPixel(x: number, y: number): Rgb8 {
    const i = (y * this.width + x) * 4;
    return [this.data[i], this.data[i + 1], this.data[i + 2]];
  }

  /** Blend `color` with opacity `alpha` over pixel (x, y), if inside the clip rectangle. */
  blendPixel(x: number, y: number, color: Rgb8, alpha: number): void {
    if (x < this.clipX0 || y < this.clipY0 || x >= this.clipX1 || y >= this.clipY1 || alpha <= 0) return;
    const i = (y * this.width + x) * 4;
    const d = this.data;
    if (alpha >= 1) {
      d[i] = color[0];
      d[i + 1] = color[1];
      d[i + 2] = color[2];
    } else {
      d[i] = Math.round(d[i] + (color[0] - d[i]) * alpha);
      d[i + 1] = Math.round(d[i + 1] + (color[1] - d[i + 1]) * alpha);
      d[i + 2] = Math.round(d[i + 2] + (color[2] - d[i + 2]) * alpha);
    }
    d[i + 3] = 255;
  }

  /** Fill the pixels of [x, x + width) x [y, y + height) (coordinates rounded). */
  fillRect(x: number, y: number, width: number, height: number, color: Rgb8, alpha = 1): void {
    const x0 = Math.max(this.clipX0, Math.round(x));
    const y0 = Math.max(this.clipY0, Math.round(y));
    const x1 = Math.min(this.clipX1, Math.round(x + width));
    const y1 = Math.min(this.clipY1, Math.round(y + height));
    if (x1 <= x0 || y1 <= y0) return;
    if (alpha >= 1) {
      // Whole pixels as 32-bit words, packed through a byte view so the platform's byte order holds.
      pixelBytes[0] = color[0];
      pixelBytes[1] = color[1];
      pixelBytes[2] = color[2];
      pixelBytes[3] = 255;
      const word = pixelWord[0];
      for (let j = y0; j < y1; j++) this.words.fill(word, j * this.width + x0, j * this.width + x1);
      return;
    }
    for (let j = y0; j < y1; j++) for (let i = x0; i < x1; i++) this.blendPixel(i, j, color, alpha);
  }

  /** Outline of a rectangle drawn inside [x, x + width) x [y, y + height). */
  strokeRect(x: number, y: number, width: number, height: number, color: Rgb8, widthPx = 1): void {
    this.fillRect(x, y, width, widthPx, color);
    this.fillRect(x, y + height - widthPx, width, widthPx, color);
    this.fillRect(x, y, widthPx, height, color);
    this.fillRect(x + width - widthPx, y, widthPx, height, color);
  }

  /** Anti-aliased straight line between two points (continuous pixel coordinates). */
  line(x0: number, y0: number, x1: number, y1: number, style: StrokeStyle): void {
    this.polyline([x0, x1], [y0, y1], style);
  }

  /**
   * Anti-aliased polyline through (xs[k], ys[k]) with round joins and caps. A NaN
   * coordinate lifts the pen, so gaps in a data series stay gaps.
   */
  polyline(xs: ArrayLike<number>, ys: ArrayLike<number>, style: StrokeStyle): void {
    if (xs.length !== ys.length) throw new Error(`polyline: ${xs.length} x values but ${ys.length} y values`);
    const halfWidth = (style.widthPx ?? 1) / 2;
    const pad = halfWidth + 1;
    let minX = Infinity;
    let minY = Infinity;
    let maxX = -Infinity;
    let maxY = -Infinity;
    for (let k = 0; k < xs.length; k++) {
      if (!Number.isFinite(xs[k]) || !Number.isFinite(ys[k])) continue;
      minX = Math.min(minX, xs[k]);
      maxX = Math.max(maxX, xs[k]);
      minY = Math.min(minY, ys[k]);
      maxY = Math.max(maxY, ys[k]);
    }
    const bx0 = Math.max(this.clipX0, Math.floor(minX - pad));
    const by0 = Math.max(this.clipY0, Math.floor(minY - pad));
    const bx1 = Math.min(this.clipX1, Math.ceil(maxX + pad));
    const by1 = Math.min(this.clipY1, Math.ceil(maxY + pad));
    if (!(bx1 > bx0 && by1 > by0)) return;
    const bw = bx1 - bx0;
    const coverage = new Float32Array(bw * (by1 - by0));

    const stamp = (ax: number, ay: number, cx: number, cy: number): void => {
      const sx0 = Math.max(bx0, Math.floor(Math.min(ax, cx) - pad));
      const sx1 = Math.min(bx1, Math.ceil(Math.max(ax, cx) + pad));
      const sy0 = Math.max(by0, Math.floor(Math.min(ay, cy) - pad));
      const sy1 = Math.min(by1, Math.ceil(Math.max(ay, cy) + pad));
      const dx = cx - ax;
      const dy = cy - ay;
      const len2 = dx * dx + dy * dy;
      for (let j = sy0; j < sy1; j++) {
        const py = j + 0.5;
        for (let i = sx0; i < sx1; i++) {
          const px = i + 0.5;
          let t = len2 > 0 ? ((px - ax) * dx + (py - ay) * dy) / len2 : 0;
          t = t < 0 ? 0 : t > 1 ? 1 : t;
          const ex = px - (ax + t * dx);
          const ey = py - (ay + t * dy);
          const dist = Math.sqrt(ex * ex + ey * ey);
          const cov = halfWidth + 0.5 - dist;
          if (cov <= 0) continue;
          const k = (j - by0) * bw + (i - bx0);
          const c = cov > 1 ? 1 : cov;
          if (c > coverage[k]) coverage[k] = c;
        }
      }
    };

    const dash = style.dashPx;
    if (dash && dash.length > 0 && dash.some((d) => d > 0)) {
      // Walk along the arc length; the dash phase carries across vertices.
      let dashIndex = 0;
      let left = dash[0];
      for (let k = 1; k < xs.length; k++) {
        const ax = xs[k - 1];
        const ay = ys[k - 1];
        const cx = xs[k];
        const cy = ys[k];
        if (![ax, ay, cx, cy].every(Number.isFinite)) continue;
        const segLength = Math.sqrt((cx - ax) ** 2 + (cy - ay) ** 2);
        let done = 0;
        while (done < segLength) {
          const step = Math.min(left, segLength - done);
          if (dashIndex % 2 === 0 && step > 0) {
            const t0 = done / segLength;
            const t1 = (done + step) / segLength;
            stamp(ax + t0 * (cx - ax), ay + t0 * (cy - ay), ax + t1 * (cx - ax), ay + t1 * (cy - ay));
          }
          done += step;
          left -= step;
          if (left <= 1e-9) {
            dashIndex = (dashIndex + 1) % dash.length;
            left = dash[dashIndex];
          }
        }
      }
    } else {
      for (let k = 0; k < xs.length; k++) {
        if (!Number.isFinite(xs[k]) || !Number.isFinite(ys[k])) continue;
        const hasNext = k + 1 < xs.length && Number.isFinite(xs[k + 1]) && Number.isFinite(ys[k + 1]);
        const hasPrev = k > 0 && Number.isFinite(xs[k - 1]) && Number.isFinite(ys[k - 1]);
        if (hasNext) stamp(xs[k], ys[k], xs[k + 1], ys[k + 1]);
        else if (!hasPrev) stamp(xs[k], ys[k], xs[k], ys[k]); // an isolated point: a dot
      }
    }

    const alpha = style.alpha ?? 1;
    for (let j = by0; j < by1; j++) {
      for (let i = bx0; i < bx1; i++) {
        const c = coverage[(j - by0) * bw + (i - bx0)];
        if (c > 0) this.blendPixel(i, j, style.color, c * alpha);
      }
    }
  }

  /** Anti-aliased filled disc of radius `radiusPx` centred at (cx, cy). */
  fillCircle(cx: number, cy: number, radiusPx: number, color: Rgb8, alpha = 1): void {
    const x0 = Math.floor(cx - radiusPx - 1);
    const x1 = Math.ceil(cx + radiusPx + 1);
    const y0 = Math.floor(cy - radiusPx - 1);
    const y1 = Math.ceil(cy + radiusPx + 1);
    for (let j = y0; j < y1; j++) {
      for (let i = x0; i < x1; i++) {
        const cov = radiusPx + 0.5 - Math.hypot(i + 0.5 - cx, j + 0.5 - cy);
        if (cov > 0) this.blendPixel(i, j, color, (cov > 1 ? 1 : cov) * alpha);
      }
    }
  }

  /** Measure `text` as `style` would draw it (unrotated width and height). */
  measureText(text: string, style: TextStyle = {}): TextMetrics {
    return measureText(text, style.scale ?? 1);
  }

  /**
   * Draw one line of text; (x, y) is the anchor point (see TextStyle). Returns the box of
   * the text cell on the raster, useful for layout and tests.
   */
  text(text: string, x: number, y: number, style: TextStyle = {}): PixelBox {
    const scale = style.scale ?? 1;
    const metrics = measureText(text, scale);
    const anchor = style.anchor ?? 'start';
    const baseline = style.baseline ?? 'alphabetic';
    const along = anchor === 'start' ? 0 : anchor === 'middle' ? -metrics.widthPx / 2 : -metrics.widthPx;
    const across =
      baseline === 'top'
        ? 0
        : baseline === 'middle'
          ? -metrics.ascentPx / 2
          : baseline === 'alphabetic'
            ? -metrics.ascentPx
            : -metrics.heightPx;
    const rotated = style.rotation === 90;
    // Screen position of the text's own origin (top-left of its first cell).
    const ox = Math.round(rotated ? x + across : x + along);
    const oy = Math.round(rotated ? y - along : y + across);
    const draw = (color: Rgb8, shiftX: number, shiftY: number): void => {
      forEachInkedPixel(text, (gx, gy) => {
        if (rotated) this.fillRect(ox + gy * scale + shiftX, oy - (gx + 1) * scale + shiftY, scale, scale, color);
        else this.fillRect(ox + gx * scale + shiftX, oy + gy * scale + shiftY, scale, scale, color);
      });
    };
    if (style.halo) {
      for (let sy = -1; sy <= 1; sy++) for (let sx = -1; sx <= 1; sx++) if (sx !== 0 || sy !== 0) draw(style.halo, sx, sy);
    }
    draw(style.color ?? black, 0, 0);
    const cellHeight = fontCellRows * scale;
    return rotated
      ? { x: ox, y: oy - metrics.widthPx, width: cellHeight, height: metrics.widthPx }
      : { x: ox, y: oy, width: metrics.widthPx, height: cellHeight };
  }

  /**
   * Copy `source` with its top-left corner at (dstX, dstY), every source pixel becoming a
   * `factor` x `factor` block (nearest-neighbour upscaling, so sites stay sharp squares).
   */
  blitScaled(source: RgbaImage, dstX: number, dstY: number, factor = 1): void {
    if (!Number.isInteger(factor) || factor < 1) throw new Error(`blit scale: expected an integer >= 1, got ${factor}`);
    if (!Number.isInteger(dstX) || !Number.isInteger(dstY)) throw new Error('blit position: expected integer pixels');
    const x0 = Math.max(this.clipX0, dstX);
    const y0 = Math.max(this.clipY0, dstY);
    const x1 = Math.min(this.clipX1, dstX + source.width * factor);
    const y1 = Math.min(this.clipY1, dstY + source.height * factor);
    if (x1 <= x0 || y1 <= y0) return;
    // Whole pixels move as 32-bit words; both buffers are 4-byte aligned RGBA rows.
    const dst = this.words;
    const srcData =
      source.data.byteOffset % 4 === 0
        ? new Uint32Array(source.data.buffer, source.data.byteOffset, source.width * source.height)
        : new Uint32Array(source.data.slice().buffer);
    for (let j = y0; j < y1; j++) {
      const srcRow = Math.floor((j - dstY) / factor) * source.width;
      const dstRow = j * this.width;
      for (let i = x0; i < x1; i++) dst[dstRow + i] = srcData[srcRow + Math.floor((i - dstX) / factor)];
    }
  }
}

/**
 * The enlarged crops of the region where the legacy look and the foldwise copy differ most,
 * drawn at an integer zoom with no smoothing so each output pixel is a clean square, and the
 * outline on each copy that shows where they come from.
 */
import { differingWindow, greyOf, zoomFactor, type ZoomWindow } from './zoom.js';

const byId = <T extends HTMLElement>(id: string): T => document.getElementById(id) as T;

/** The copies that get a crop, by the prefix of their element ids. */
export const cropped = ['legacy', 'planned', 'points'] as const;
export type Copy = (typeof cropped)[number];

/** Grey levels of a shown picture, read back through a canvas of its natural size. */
function greyLevels(img: HTMLImageElement): Float64Array {
  const canvas = document.createElement('canvas');
  canvas.width = img.naturalWidth;
  canvas.height = img.naturalHeight;
  const context = canvas.getContext('2d', { willReadFrequently: true });
  if (!context) throw new Error('no 2D canvas');
  context.drawImage(img, 0, 0);
  const { data } = context.getImageData(0, 0, canvas.width, canvas.height);
  return greyOf(data, canvas.width * canvas.height);
}

/** Draws `win` of `img` into `canvas`, enlarged `zoom` times, every pixel a hard-edged square. */
function drawZoom(canvas: HTMLCanvasElement, img: HTMLImageElement, win: ZoomWindow, zoom: number, label: string) {
  canvas.width = win.width * zoom;
  canvas.height = win.height * zoom;
  const context = canvas.getContext('2d');
  if (!context) return;
  context.imageSmoothingEnabled = false;
  context.drawImage(img, win.x, win.y, win.width, win.height, 0, 0, canvas.width, canvas.height);
  canvas.setAttribute('aria-label', label);
}

/** Outlines `win` on a rendition shown at its natural size (one CSS pixel per image pixel). */
function placeMark(mark: HTMLElement, win: ZoomWindow | undefined): void {
  mark.hidden = !win;
  if (!win) return;
  mark.style.left = `${win.x}px`;
  mark.style.top = `${win.y}px`;
  mark.style.width = `${win.width}px`;
  mark.style.height = `${win.height}px`;
}

const names: Record<Copy, string> = { legacy: 'Legacy look', planned: 'foldwise copy', points: 'Point sampling' };

/** Finds where the legacy and foldwise copies differ most and draws that window of each copy shown. */
export function showCrops(source: string, copies: readonly Copy[]): void {
  const legacy = byId<HTMLImageElement>('legacy-img');
  const planned = byId<HTMLImageElement>('planned-img');
  const { naturalWidth: w, naturalHeight: h } = planned;
  if (legacy.naturalWidth !== w || legacy.naturalHeight !== h) {
    clearCrops('The two copies differ in size, so they cannot be compared pixel for pixel.');
    return;
  }
  const win = differingWindow(greyLevels(legacy), greyLevels(planned), w, h);
  const zoom = zoomFactor(win);
  const where = `output pixels ${win.x}–${win.x + win.width} across, ${win.y}–${win.y + win.height} down`;
  byId('zoom-note').textContent =
    win.spread < 0.5
      ? `The copies differ only by an even change of tone here; the outlined square (${where}) is shown ${zoom} times larger.`
      : `The outlined square on each copy (${where}) is where their patterns differ most ` +
        `(by ${win.spread.toFixed(1)} grey levels, not counting an even change of tone), shown ${zoom} times larger so that every pixel is a clear square.`;
  for (const copy of cropped) {
    const shown = copies.includes(copy);
    placeMark(byId(`${copy}-mark`), shown ? win : undefined);
    if (!shown) continue;
    const label = `${names[copy]} of ${source}, ${where}, enlarged ${zoom} times`;
    drawZoom(byId(`${copy}-zoom`), byId(`${copy}-img`), win, zoom, label);
  }
}

/** Blanks the crops and the outlines, with a note saying why. */
export function clearCrops(note: string): void {
  for (const copy of cropped) {
    const canvas = byId<HTMLCanvasElement>(`${copy}-zoom`);
    canvas.width = 1;
    canvas.height = 1;
    canvas.setAttribute('aria-label', 'Not drawn');
    placeMark(byId(`${copy}-mark`), undefined);
  }
  byId('zoom-note').textContent = note;
}

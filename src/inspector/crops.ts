/**
 * The enlarged crops of the riskiest region from both copies, drawn at an integer zoom with
 * no smoothing so each output pixel is a clean square, and the outline on each copy that
 * shows where they come from.
 */
import { geometryOf, type Report } from './report-view.js';
import { riskiestWindow, zoomFactor, type ZoomWindow } from './zoom.js';

const byId = <T extends HTMLElement>(id: string): T => document.getElementById(id) as T;

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

/** Draws both crops around the riskiest grid cell that the copies show. */
export function showCrops(report: Report, source: string): void {
  const naive = byId<HTMLImageElement>('naive-img');
  const planned = byId<HTMLImageElement>('planned-img');
  const win = riskiestWindow(report.grid, geometryOf(report));
  placeMark(byId('naive-mark'), win);
  placeMark(byId('planned-mark'), win);
  if (!win) {
    clearCrops('The report names no region inside this copy.');
    return;
  }
  const zoom = zoomFactor(win);
  const where = `output pixels ${win.x}–${win.x + win.width} across, ${win.y}–${win.y + win.height} down`;
  byId('zoom-note').textContent =
    `The outlined square on each copy (${where}), around the region the report rates riskiest ` +
    `(score ${win.risk.toFixed(2)} of 1 for the foldwise copy), ` +
    `shown ${zoom} times larger so that every pixel is a clear square.`;
  drawZoom(byId('naive-zoom'), naive, win, zoom, `Careless copy of ${source}, ${where}, enlarged ${zoom} times`);
  drawZoom(byId('planned-zoom'), planned, win, zoom, `foldwise copy of ${source}, ${where}, enlarged ${zoom} times`);
}

/** Blanks both crops and the outlines, with a note saying why. */
export function clearCrops(note: string): void {
  for (const id of ['naive-zoom', 'planned-zoom']) {
    const canvas = byId<HTMLCanvasElement>(id);
    canvas.width = 1;
    canvas.height = 1;
    canvas.setAttribute('aria-label', 'Not drawn');
  }
  placeMark(byId('naive-mark'), undefined);
  placeMark(byId('planned-mark'), undefined);
  byId('zoom-note').textContent = note;
}

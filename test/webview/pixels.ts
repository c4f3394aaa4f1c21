/** Reading a plot's canvas back in the page, to check what was drawn. */
import type { Page } from 'playwright-core';

// Code passed to page.evaluate runs in the browser; the Node type-check has no DOM library, so the
// page globals are declared loosely here (module scope only).
declare const document: any;

export interface ColourCount {
  colour: string;
  pixels: number;
}

/**
 * Counts the pixels of the plot's main canvas that are within `tolerance` (per channel) of each
 * colour, inside the plot area (the canvas minus a margin where the axes and labels are).
 */
export async function countColours(page: Page, plotId: string, colours: readonly string[], tolerance = 24): Promise<ColourCount[]> {
  return page.evaluate(
    ({ plotId, colours, tolerance }) => {
      const canvas = document.querySelector(`figure[data-plot="${plotId}"] canvas.plot-canvas:not(.plot-overlay)`);
      if (!canvas) throw new Error(`no canvas for plot ${plotId}`);
      const context = canvas.getContext('2d');
      const { width, height } = canvas;
      const data = context.getImageData(0, 0, width, height).data;
      const targets = colours.map((hex) => [1, 3, 5].map((i) => parseInt(hex.slice(i, i + 2), 16)));
      const counts = colours.map(() => 0);
      const left = Math.floor(width * 0.12);
      const bottom = Math.floor(height * 0.85);
      for (let y = 4; y < bottom; y++) {
        for (let x = left; x < width - 4; x++) {
          const o = (y * width + x) * 4;
          targets.forEach((t, c) => {
            if (Math.abs(data[o] - t[0]) <= tolerance && Math.abs(data[o + 1] - t[1]) <= tolerance && Math.abs(data[o + 2] - t[2]) <= tolerance) counts[c]++;
          });
        }
      }
      return colours.map((colour, c) => ({ colour, pixels: counts[c] }));
    },
    { plotId, colours, tolerance },
  );
}

/** Waits until the plot's canvas has pixels of at least one of the colours (it draws on an animation frame). */
export async function waitForDrawing(page: Page, plotId: string, colours: readonly string[]): Promise<void> {
  const deadline = Date.now() + 10_000;
  while (Date.now() < deadline) {
    const counts = await countColours(page, plotId, colours).catch(() => []);
    if (counts.some((c) => c.pixels > 0)) return;
    await page.waitForTimeout(50);
  }
  throw new Error(`plot ${plotId} was not drawn within 10 s`);
}

/** Pixels of the overlay canvas that are not transparent (highlight rings). */
export async function overlayPixels(page: Page, plotId: string): Promise<number> {
  return page.evaluate((plotId) => {
    const canvas = document.querySelector(`figure[data-plot="${plotId}"] canvas.plot-overlay`);
    if (!canvas) throw new Error(`no overlay for plot ${plotId}`);
    const data = (canvas.getContext('2d')).getImageData(0, 0, canvas.width, canvas.height).data;
    let count = 0;
    for (let i = 3; i < data.length; i += 4) if (data[i] > 0) count++;
    return count;
  }, plotId);
}

/** A spot (CSS pixels from the canvas's top left) where the plot drew exactly this colour, or null. */
export async function findColour(page: Page, plotId: string, colour: string): Promise<{ x: number; y: number } | null> {
  return page.evaluate(
    ({ plotId, colour }) => {
      const canvas = document.querySelector(`figure[data-plot="${plotId}"] canvas.plot-canvas:not(.plot-overlay)`);
      if (!canvas) throw new Error(`no canvas for plot ${plotId}`);
      const { width, height } = canvas;
      const data = canvas.getContext('2d').getImageData(0, 0, width, height).data;
      const target = [1, 3, 5].map((i) => parseInt(colour.slice(i, i + 2), 16));
      const ratio = width / canvas.getBoundingClientRect().width;
      const matches = (x: number, y: number): boolean => {
        const o = (y * width + x) * 4;
        return data[o] === target[0] && data[o + 1] === target[1] && data[o + 2] === target[2];
      };
      // Scan from the middle outwards in rows, so the spot is well inside the plot area. A marker's
      // inside is solid colour around the pixel; an ellipse's thin outline is not.
      for (let step = 0; step < height / 2 - 2; step++) {
        for (const y of [Math.floor(height / 2) + step, Math.floor(height / 2) - step]) {
          for (let x = Math.floor(width * 0.15); x < width * 0.95; x++) {
            if (matches(x, y) && matches(x - 1, y) && matches(x + 1, y) && matches(x, y - 1) && matches(x, y + 1)) return { x: (x + 0.5) / ratio, y: (y + 0.5) / ratio };
          }
        }
      }
      return null;
    },
    { plotId, colour },
  );
}

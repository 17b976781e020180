/**
 * Floor map at warehouse size (20,000 bins) in headless Chromium: mount time, and frame times while
 * panning and wheel-zooming, at three zoom levels, unthrottled and with the CPU slowed 4× (a rough
 * stand-in for a picker tablet). Starts its own Vite dev server on a free port and stops it.
 * Screenshots go to /tmp/floor-map-*.png.
 */
import { existsSync } from 'node:fs';
import { createServer as createNetServer } from 'node:net';
import { cpus, loadavg } from 'node:os';
import { dirname, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import { chromium, type Page } from '@playwright/test';
import { createServer, type ViteDevServer } from 'vite';
// Overridable (CHROMIUM_PATH) so the skip path can be tried without touching the machine's browser.
import { CHROMIUM, CHROMIUM_ARGS } from '../e2e/harness/chromium';

const root = resolve(dirname(fileURLToPath(import.meta.url)), '../..');
const HARNESS = '/tests/e2e/harness/floor-map.html';

function freePort(): Promise<number> {
  return new Promise((ok, fail) => {
    const srv = createNetServer();
    srv.once('error', fail);
    srv.listen(0, '127.0.0.1', () => {
      const addr = srv.address();
      const port = typeof addr === 'object' && addr ? addr.port : 0;
      srv.close(() => ok(port));
    });
  });
}

interface FrameStats {
  /** Time the map spent drawing per frame (plan layer + route layer), ms. */
  workMedianMs: number;
  workP95Ms: number;
  workMaxMs: number;
  frames: number;
  medianMs: number;
  p95Ms: number;
  maxMs: number;
  over20Ms: number;
  staticRenders: number;
  staticBlits: number;
  lastStaticRenderMs: number;
  lastOverlayMs: number;
  binsDrawn: number;
}

/** Runs a gesture in the page, one synthetic event per animation frame, and times the frames. */
async function gesture(page: Page, kind: 'pan' | 'wheel', frames: number): Promise<FrameStats> {
  return page.evaluate(
    async ({ kind, frames }) => {
      type Stats = {
        staticRenders: number;
        staticBlits: number;
        lastStaticRenderMs: number;
        lastStaticDrawMs: number;
        lastOverlayMs: number;
        lastBinsDrawn: number;
        draws: number;
      };
      const fm = (window as unknown as { __floorMap: { map: { stats: () => Stats } } }).__floorMap;
      const el = document.querySelector('.floor-map__canvas') as HTMLElement;
      const box = el.getBoundingClientRect();
      const cx = box.left + box.width / 2;
      const cy = box.top + box.height / 2;
      const before = fm.map.stats();
      const deltas: number[] = [];
      const work: number[] = [];
      let seenDraws = before.draws;
      const opts = (x: number, y: number, buttons: number): PointerEventInit => ({
        pointerId: 7,
        pointerType: 'mouse',
        isPrimary: true,
        clientX: x,
        clientY: y,
        buttons,
        bubbles: true,
      });
      let x = cx;
      let y = cy;
      if (kind === 'pan') el.dispatchEvent(new PointerEvent('pointerdown', opts(x, y, 1)));
      await new Promise<void>((done) => {
        let last = 0;
        let i = 0;
        const step = (t: number): void => {
          if (last > 0) deltas.push(t - last);
          last = t;
          const now = fm.map.stats();
          if (now.draws !== seenDraws) {
            seenDraws = now.draws;
            work.push(now.lastStaticDrawMs + now.lastOverlayMs);
          }
          if (i >= frames) {
            done();
            return;
          }
          if (kind === 'pan') {
            // Back and forth so the gesture stays over the plan.
            const dir = Math.floor(i / 40) % 2 === 0 ? 1 : -1;
            x += 9 * dir;
            y += 3 * dir;
            el.dispatchEvent(new PointerEvent('pointermove', opts(x, y, 1)));
          } else {
            const dir = Math.floor(i / 30) % 2 === 0 ? -1 : 1;
            el.dispatchEvent(new WheelEvent('wheel', { deltaY: 40 * dir, clientX: cx + 50, clientY: cy - 30, bubbles: true, cancelable: true }));
          }
          i++;
          requestAnimationFrame(step);
        };
        requestAnimationFrame(step);
      });
      if (kind === 'pan') el.dispatchEvent(new PointerEvent('pointerup', opts(x, y, 0)));
      const after = fm.map.stats();
      const sorted = deltas.slice().sort((a, b) => a - b);
      const q = (p: number): number => sorted[Math.min(sorted.length - 1, Math.floor(p * sorted.length))] ?? 0;
      const w = work.slice().sort((a, b) => a - b);
      return {
        workMedianMs: w[w.length >> 1] ?? 0,
        workP95Ms: w[Math.min(w.length - 1, Math.floor(0.95 * w.length))] ?? 0,
        workMaxMs: w[w.length - 1] ?? 0,
        frames: deltas.length,
        medianMs: q(0.5),
        p95Ms: q(0.95),
        maxMs: sorted[sorted.length - 1] ?? 0,
        over20Ms: deltas.filter((d) => d > 20).length,
        staticRenders: after.staticRenders - before.staticRenders,
        staticBlits: after.staticBlits - before.staticBlits,
        lastStaticRenderMs: after.lastStaticRenderMs,
        lastOverlayMs: after.lastOverlayMs,
        binsDrawn: after.lastBinsDrawn,
      };
    },
    { kind, frames },
  );
}

/** Sets the zoom by pressing the map's zoom-in button n times after a fit. */
async function zoomSteps(page: Page, n: number): Promise<void> {
  await page.evaluate((n) => {
    const fm = (window as unknown as { __floorMap: { map: { fit: () => void; zoomBy: (f: number) => void } } }).__floorMap;
    fm.map.fit();
    for (let i = 0; i < n; i++) fm.map.zoomBy(1.4);
  }, n);
  await page.waitForTimeout(300);
}

/**
 * A full vector redraw of the plan at the current zoom (what a settled zoom step costs), timed
 * with its blit: the canvas rasterises its recorded drawing when the bitmap is first drawn.
 */
async function fullRedrawMs(page: Page): Promise<{ ms: number; bins: number }> {
  return page.evaluate(async () => {
    type Api = { zoomBy: (f: number) => void; stats: () => { lastStaticDrawMs: number; lastBinsDrawn: number } };
    const fm = (window as unknown as { __floorMap: { map: Api } }).__floorMap;
    const times: number[] = [];
    for (let i = 0; i < 6; i++) {
      fm.map.zoomBy(i % 2 === 0 ? 1.0001 : 1 / 1.0001);
      await new Promise((r) => requestAnimationFrame(() => requestAnimationFrame(r)));
      times.push(fm.map.stats().lastStaticDrawMs);
    }
    times.sort((a, b) => a - b);
    return { ms: times[times.length >> 1] ?? 0, bins: fm.map.stats().lastBinsDrawn };
  });
}

/**
 * Pans with Playwright's mouse (real input events through the browser, one round trip each) while
 * the page records frame deltas: the same gesture as a person dragging, at whatever rate CDP allows.
 */
async function mousePan(page: Page, moves: number): Promise<{ frames: number; medianMs: number; p95Ms: number; maxMs: number }> {
  await page.evaluate(() => {
    const rec = { on: true, deltas: [] as number[], last: 0 };
    (window as unknown as { __rec: typeof rec }).__rec = rec;
    const tick = (t: number): void => {
      if (rec.last > 0) rec.deltas.push(t - rec.last);
      rec.last = t;
      if (rec.on) requestAnimationFrame(tick);
    };
    requestAnimationFrame(tick);
  });
  await page.mouse.move(500, 400);
  await page.mouse.down();
  for (let i = 1; i <= moves; i++) {
    const dir = Math.floor(i / 40) % 2 === 0 ? 1 : -1;
    await page.mouse.move(500 + dir * (i % 40) * 8, 400 + dir * (i % 40) * 2);
  }
  await page.mouse.up();
  return page.evaluate(() => {
    const rec = (window as unknown as { __rec: { on: boolean; deltas: number[] } }).__rec;
    rec.on = false;
    const d = rec.deltas.slice().sort((a, b) => a - b);
    const q = (p: number): number => d[Math.min(d.length - 1, Math.floor(p * d.length))] ?? 0;
    return { frames: d.length, medianMs: q(0.5), p95Ms: q(0.95), maxMs: d[d.length - 1] ?? 0 };
  });
}

const fmt = (v: number): string => v.toFixed(1);

export async function run(): Promise<void> {
  if (!existsSync(CHROMIUM)) {
    console.log(`floor-map bench skipped: ${CHROMIUM} not found (apt-get install -y chromium)`);
    return;
  }
  const port = await freePort();
  let server: ViteDevServer | null = null;
  const browser = await chromium.launch({ executablePath: CHROMIUM, args: [...CHROMIUM_ARGS] });
  try {
    server = await createServer({
      root,
      configFile: resolve(root, 'vite.config.ts'),
      logLevel: 'error',
      // Scan only the harness: other pages may be mid-change while the bench runs.
      optimizeDeps: { entries: [HARNESS.slice(1)] },
      server: { port, strictPort: true, host: '127.0.0.1', hmr: false },
    });
    await server.listen();
    const url = `http://127.0.0.1:${port}${HARNESS}`;
    const page = await browser.newPage({ viewport: { width: 1280, height: 800 } });
    // tsx compiles with keepNames, which wraps functions passed to page.evaluate in `__name(...)`.
    await page.addInitScript({ content: 'window.__name = (f) => f;' });
    // First load compiles the modules in Vite; the second is the one measured.
    await page.goto(url);
    await page.waitForFunction(() => (window as unknown as { __floorMap?: { ready: boolean } }).__floorMap?.ready === true, null, { timeout: 120_000 });
    const mounts: number[] = [];
    for (let i = 0; i < 3; i++) {
      await page.reload();
      await page.waitForFunction(() => (window as unknown as { __floorMap?: { ready: boolean } }).__floorMap?.ready === true, null, { timeout: 60_000 });
      mounts.push(await page.evaluate(() => (window as unknown as { __floorMap: { mountMs: number } }).__floorMap.mountMs));
    }
    const info = await page.evaluate(() => {
      const fm = (window as unknown as { __floorMap: { bins: number; map: { stats: () => { indexBuildMs: number } } } }).__floorMap;
      return { bins: fm.bins, indexBuildMs: fm.map.stats().indexBuildMs };
    });
    mounts.sort((a, b) => a - b);
    console.log(
      `bins: ${info.bins}; mount to first frame (main map + mini map, median of 3): ${fmt(mounts[1] ?? 0)} ms; index build: ${fmt(info.indexBuildMs)} ms`,
    );
    await page.screenshot({ path: '/tmp/floor-map-fit.png' });
    await page.locator('.trip-mini-map').screenshot({ path: '/tmp/floor-map-mini.png' });

    const cdp = await page.context().newCDPSession(page);
    const rows: string[] = [];
    for (const throttle of [1, 4]) {
      await cdp.send('Emulation.setCPUThrottlingRate', { rate: throttle });
      for (const [name, steps] of [
        ['fit (whole plan)', 0],
        ['mid zoom', 4],
        ['close zoom', 7],
      ] as const) {
        await zoomSteps(page, steps);
        if (throttle === 1) await page.screenshot({ path: `/tmp/floor-map-zoom${steps}.png` });
        const redraw = await fullRedrawMs(page);
        const pan = await gesture(page, 'pan', 150);
        const wheel = await gesture(page, 'wheel', 90);
        rows.push(
          `| ${throttle}× | ${name} | ${redraw.bins} | ${fmt(redraw.ms)} | ${fmt(pan.medianMs)} / ${fmt(pan.p95Ms)} / ${fmt(pan.maxMs)} | ${pan.over20Ms}/${pan.frames} | ${fmt(pan.workMedianMs)} / ${fmt(pan.workP95Ms)} / ${fmt(pan.workMaxMs)} | ${pan.staticRenders} | ${fmt(wheel.medianMs)} / ${fmt(wheel.p95Ms)} / ${fmt(wheel.maxMs)} | ${wheel.over20Ms}/${wheel.frames} | ${fmt(wheel.workMedianMs)} / ${fmt(wheel.workP95Ms)} / ${fmt(wheel.workMaxMs)} | ${wheel.staticRenders} |`,
        );
      }
    }
    await cdp.send('Emulation.setCPUThrottlingRate', { rate: 1 });
    await zoomSteps(page, 0);
    const real = await mousePan(page, 160);
    console.log('\nms as median / p95 / max. frames = requestAnimationFrame deltas; draw = time the map itself spent drawing');
    console.log('per frame (plan layer + route layer); vector = plan drawn as vectors during the gesture (else cached bitmap).');
    console.log(
      `machine load average at start: ${loadavg()
        .map((l) => l.toFixed(1))
        .join(' ')} on ${cpus().length} cores`,
    );
    console.log(
      '| CPU | zoom | bins drawn | full redraw ms | pan frames | pan >20 ms | pan draw | pan vector | wheel frames | wheel >20 ms | wheel draw | wheel vector |',
    );
    console.log('|---|---|---|---|---|---|---|---|---|---|---|---|');
    for (const r of rows) console.log(r);
    console.log(
      `\npan at fit with Playwright's mouse (160 moves, 1× CPU): ${real.frames} frames, ${fmt(real.medianMs)} / ${fmt(real.p95Ms)} / ${fmt(real.maxMs)} ms`,
    );

    // Pictures to look at: search hit with tooltip, dark palette.
    await page.fill('.floor-map__input', 'K-20-03-2');
    await page.press('.floor-map__input', 'Enter');
    await page.waitForTimeout(300);
    await page.screenshot({ path: '/tmp/floor-map-search.png' });
    await page.goto(`${url}?dark=1`);
    await page.waitForFunction(() => (window as unknown as { __floorMap?: { ready: boolean } }).__floorMap?.ready === true, null, { timeout: 60_000 });
    await page.screenshot({ path: '/tmp/floor-map-dark.png' });
    await page.locator('.trip-mini-map').screenshot({ path: '/tmp/floor-map-mini-dark.png' });
    await page.goto(`${url}?stops=7&span=6`);
    await page.waitForFunction(() => (window as unknown as { __floorMap?: { ready: boolean } }).__floorMap?.ready === true, null, { timeout: 60_000 });
    await page.locator('.trip-mini-map').screenshot({ path: '/tmp/floor-map-mini-short.png' });
    console.log('\nscreenshots: /tmp/floor-map-{fit,mini,zoom0,zoom4,zoom7,search,dark,mini-dark,mini-short}.png');
  } finally {
    await browser.close();
    await server?.close();
  }
}

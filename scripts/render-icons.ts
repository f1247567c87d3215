/**
 * Renders the app icons (public/icons/*.png) from their SVG sources with Debian's Chromium, so the
 * PNG sizes the web app manifest names always match the drawing: `npx tsx scripts/render-icons.ts`.
 */
import fs from 'node:fs';
import path from 'node:path';
import { chromium } from 'playwright-core';

const DIR = path.resolve(__dirname, '..', 'public', 'icons');
const OUT: Array<{ svg: string; png: string; size: number; background?: string }> = [
  { svg: 'icon.svg', png: 'icon-192.png', size: 192 },
  { svg: 'icon.svg', png: 'icon-512.png', size: 512 },
  { svg: 'icon-maskable.svg', png: 'icon-maskable-512.png', size: 512 },
  { svg: 'icon-maskable.svg', png: 'apple-touch-icon-180.png', size: 180, background: '#276484' },
];

async function main(): Promise<void> {
  const browser = await chromium.launch({ executablePath: '/usr/bin/chromium', headless: true });
  try {
    for (const o of OUT) {
      const page = await browser.newPage({ viewport: { width: o.size, height: o.size } });
      const svg = fs.readFileSync(path.join(DIR, o.svg), 'utf8');
      await page.setContent(
        `<html><body style="margin:0;background:${o.background ?? 'transparent'}"><img style="display:block;width:${o.size}px;height:${o.size}px" src="data:image/svg+xml;base64,${Buffer.from(svg).toString('base64')}"></body></html>`,
      );
      await page.locator('img').evaluate((img) => (img as unknown as { decode(): Promise<void> }).decode());
      await page.screenshot({ path: path.join(DIR, o.png), omitBackground: !o.background });
      await page.close();
      console.log(`${o.png} ${o.size}x${o.size}`);
    }
  } finally {
    await browser.close();
  }
}

void main();

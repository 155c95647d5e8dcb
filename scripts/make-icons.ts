/** Renders public/favicon.svg to the PNG icons of the manifest with Debian's chromium. Run by hand when the icon changes. */
import { chromium } from '@playwright/test';
import { readFileSync } from 'node:fs';
import path from 'node:path';
import { CHROMIUM, ensureChromium } from './lib/chromium';

const root = path.resolve(import.meta.dirname, '..');
const svg = readFileSync(path.join(root, 'public/favicon.svg'), 'utf8');
ensureChromium();
const browser = await chromium.launch({ executablePath: CHROMIUM, args: ['--no-sandbox', '--disable-gpu'] });
const page = await browser.newPage();
for (const [name, size, pad] of [['icon-192', 192, 0], ['icon-512', 512, 0], ['icon-180', 180, 0], ['icon-maskable-512', 512, 0.12]] as const) {
  await page.setViewportSize({ width: size, height: size });
  const inner = Math.round(size * (1 - 2 * pad));
  await page.setContent(`<body style="margin:0;background:${pad ? '#2E3A40' : 'transparent'};display:grid;place-items:center;width:${size}px;height:${size}px">${svg.replace('<svg ', `<svg width="${inner}" height="${inner}" `)}</body>`);
  await page.screenshot({ path: path.join(root, 'public/icons', `${name}.png`), omitBackground: !pad });
}
await browser.close();
console.log('icons written to public/icons');

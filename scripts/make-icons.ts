// Our own app icons, made from public/icon.svg with sharp: `npx tsx scripts/make-icons.ts`.
// The PNGs are committed (public/icons/); run this again only when the SVG changes.
import { mkdirSync, readFileSync } from 'node:fs';
import { join, resolve } from 'node:path';
import sharp from 'sharp';

const ROOT = resolve(import.meta.dirname, '..');
const svg = readFileSync(join(ROOT, 'public', 'icon.svg'));
const out = join(ROOT, 'public', 'icons');
mkdirSync(out, { recursive: true });

/** The teal of the icon's own tile, which is also the manifest's theme colour. */
const TEAL = '#0f5f66';

async function plain(size: number, name: string) {
  await sharp(svg, { density: Math.ceil((72 * size) / 64) })
    .resize(size, size)
    .png({ compressionLevel: 9 })
    .toFile(join(out, name));
  console.log(`public/icons/${name} (${size}×${size})`);
}

/**
 * Maskable: the launcher may cut the icon to any shape inside the middle 80 %, so the drawing
 * sits at 70 % on a full teal square.
 */
async function maskable(size: number, name: string) {
  const inner = Math.round(size * 0.7);
  const drawing = await sharp(svg, { density: Math.ceil((72 * inner) / 64) }).resize(inner, inner).png().toBuffer();
  await sharp({ create: { width: size, height: size, channels: 4, background: TEAL } })
    .composite([{ input: drawing, gravity: 'center' }])
    .png({ compressionLevel: 9 })
    .toFile(join(out, name));
  console.log(`public/icons/${name} (${size}×${size}, maskable)`);
}

await plain(192, 'icon-192.png');
await plain(512, 'icon-512.png');
await maskable(512, 'icon-maskable-512.png');
// iOS draws its own rounded corners over a square, so the apple icon is the full-bleed one too.
await maskable(180, 'apple-touch-icon.png');

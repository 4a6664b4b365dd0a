/**
 * Renders the web app's PNG icons (public/icons/*.png) from our own SVGs beside them. The PNGs are
 * committed; run this again after changing an SVG: `npx tsx scripts/make-icons.ts`.
 * Maskable: the mark stays inside the middle 80 % (the safe zone a launcher may crop to a circle).
 */
import path from 'node:path';
import sharp from 'sharp';

const dir = path.resolve(import.meta.dirname, '..', 'public', 'icons');
const icons: [svg: string, png: string, size: number][] = [
  ['icon.svg', 'icon-192.png', 192],
  ['icon.svg', 'icon-512.png', 512],
  ['icon.svg', 'apple-touch-icon.png', 180],
  ['icon-maskable.svg', 'icon-maskable-512.png', 512],
];

for (const [svg, png, size] of icons) {
  await sharp(path.join(dir, svg), { density: 300 }).resize(size, size).png({ compressionLevel: 9 }).toFile(path.join(dir, png));
  console.log(`${png} ${size}x${size}`);
}

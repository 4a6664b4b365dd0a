import sharp from 'sharp';

/**
 * A generated stand-in for a site photo: a steel-coloured panel with a drawn mark and a caption,
 * so the demo's quarantined parts have pictures without shipping anyone's real photographs.
 */
export async function demoPhoto(caption: string, mark: 'dent' | 'wires' | 'weld'): Promise<Buffer> {
  const marks = {
    dent: '<ellipse cx="400" cy="250" rx="120" ry="40" fill="#5b5148" stroke="#2b2520" stroke-width="6"/>',
    wires: '<path d="M250 250 q40 -60 80 0 t80 0 t80 0" fill="none" stroke="#d9d2c5" stroke-width="8"/><path d="M300 200 l30 -60 M380 205 l-20 -70" stroke="#d9d2c5" stroke-width="5"/>',
    weld: '<path d="M260 250 l40 -20 l30 25 l40 -30 l35 20 l40 -15" fill="none" stroke="#1c1a17" stroke-width="7"/>',
  } as const;
  const escaped = caption.replace(/[<>&"]/g, (c) => ({ '<': '&lt;', '>': '&gt;', '&': '&amp;', '"': '&quot;' })[c]!);
  const svg = `<svg xmlns="http://www.w3.org/2000/svg" width="800" height="600">
    <rect width="800" height="600" fill="#8d9499"/>
    <rect x="0" y="180" width="800" height="140" fill="#a7adb1" stroke="#5c6266" stroke-width="6"/>
    <path d="M0 180 L140 320 L280 180 L420 320 L560 180 L700 320 L800 220" fill="none" stroke="#6f767b" stroke-width="14"/>
    ${marks[mark]}
    <rect x="0" y="520" width="800" height="80" fill="#1d2b3a"/>
    <text x="24" y="570" font-family="sans-serif" font-size="30" fill="#f7f1e3">${escaped}</text>
  </svg>`;
  return sharp(Buffer.from(svg)).jpeg({ quality: 80 }).toBuffer();
}

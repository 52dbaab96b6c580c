/** Read back rendered output with independent tools: poppler-utils (Debian) for PDFs, the PNG header by hand. */
import { spawnSync } from 'node:child_process';
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';

function tool(cmd: string, args: string[]): string {
  const r = spawnSync(cmd, args, { encoding: 'utf8' });
  if (r.status !== 0) throw new Error(`${cmd} failed: ${r.stderr}`);
  return r.stdout;
}

export function pdfFile(pdf: Buffer): string {
  const dir = mkdtempSync(join(tmpdir(), 'mesofield-pdf-'));
  const path = join(dir, 'r.pdf');
  writeFileSync(path, pdf);
  return path;
}

export function pdfInfo(path: string): Record<string, string> {
  const out: Record<string, string> = {};
  for (const line of tool('pdfinfo', ['-isodates', path]).split('\n')) {
    const m = /^([^:]+):\s*(.*)$/.exec(line);
    if (m) out[m[1].trim()] = m[2].trim();
  }
  return out;
}

/** Text of one page (1-based), or of all pages. */
export function pdfText(path: string, page?: number): string {
  return tool('pdftotext', [...(page ? ['-f', String(page), '-l', String(page)] : []), '-layout', path, '-']);
}

/** PNG signature, IHDR width/height (PNG spec, ISO/IEC 15948 §11.2.2) and pHYs pixels per metre (§11.3.5.3). */
export function pngHeader(png: Buffer): { width: number; height: number; pixelsPerMetre?: number } {
  const sig = [137, 80, 78, 71, 13, 10, 26, 10];
  if (!sig.every((b, i) => png[i] === b)) throw new Error('not a PNG');
  if (png.toString('latin1', 12, 16) !== 'IHDR') throw new Error('no IHDR first');
  const width = png.readUInt32BE(16);
  const height = png.readUInt32BE(20);
  let off = 8;
  let pixelsPerMetre: number | undefined;
  while (off < png.length) {
    const len = png.readUInt32BE(off);
    const type = png.toString('latin1', off + 4, off + 8);
    if (type === 'pHYs' && png[off + 16] === 1) pixelsPerMetre = png.readUInt32BE(off + 8);
    if (type === 'IEND') break;
    off += 12 + len;
  }
  return { width, height, pixelsPerMetre };
}

/** Words of one page with their boxes (pdftotext -bbox), in PDF points from the top left. */
export function pdfWords(path: string, page: number): { text: string; xMin: number; xMid: number; yMid: number }[] {
  const html = tool('pdftotext', ['-bbox', '-f', String(page), '-l', String(page), path, '-']);
  const out: { text: string; xMin: number; xMid: number; yMid: number }[] = [];
  const re = /<word xMin="([\d.]+)" yMin="([\d.]+)" xMax="([\d.]+)" yMax="([\d.]+)">([^<]*)<\/word>/g;
  for (let m = re.exec(html); m; m = re.exec(html)) out.push({ text: m[5], xMin: Number(m[1]), xMid: (Number(m[1]) + Number(m[3])) / 2, yMid: (Number(m[2]) + Number(m[4])) / 2 });
  return out;
}

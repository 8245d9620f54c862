#!/usr/bin/env node
// Writes the demo workspace's data files (demo/data/) from a seeded generator, so they are the
// same on every machine: `node scripts/make-demo-data.mjs`. All scenarios are invented.
import { mkdirSync, writeFileSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';

const out = join(dirname(fileURLToPath(import.meta.url)), '..', 'demo', 'data');
mkdirSync(out, { recursive: true });

/** mulberry32, a small seeded generator. */
function generator(seed) {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

function pick(random, items, weights) {
  let u = random() * weights.reduce((a, b) => a + b, 0);
  for (let i = 0; i < items.length; i++) {
    u -= weights[i];
    if (u < 0) return items[i];
  }
  return items[items.length - 1];
}

/** Standard normal by Box–Muller. */
function normal(random) {
  const u = 1 - random();
  return Math.sqrt(-2 * Math.log(u)) * Math.cos(2 * Math.PI * random());
}

function write(name, text) {
  writeFileSync(join(out, name), text);
  console.log(`${name}: ${Buffer.byteLength(text)} bytes`);
}

// 1. A bakery's defect log: one record per inspected tray. The night shift burns more on oven C.
{
  const random = generator(11);
  const lines = ['# Bakery defect log, inspection of trays, weeks 10-13', 'tray,shift,oven,defect,weight_g'];
  const shifts = ['early', 'late', 'night'];
  const ovens = ['A', 'B', 'C', 'D'];
  const defects = ['none', 'burnt', 'underbaked', 'misshapen', 'cracked'];
  for (let tray = 1; tray <= 1800; tray++) {
    const shift = pick(random, shifts, [5, 4, 3]);
    const oven = pick(random, ovens, [3, 3, 2, 2]);
    const burnt = 1 + (shift === 'night' ? 1.5 : 0) + (oven === 'C' ? 1 : 0);
    const defect = pick(random, defects, [20, burnt, 1.5, 1.2, 0.8]);
    const grams = 850 + 12 * normal(random) - (defect === 'burnt' ? 15 : 0);
    const weight = random() < 0.02 ? 'NA' : grams.toFixed(1);
    lines.push(`${tray},${shift},${oven},${random() < 0.01 ? '' : defect},${weight}`);
  }
  write('bakery-defects.csv', `${lines.join('\n')}\n`);
}

// 2. A bike-share survey, already counted: station area × trip purpose with the number of riders.
{
  const random = generator(22);
  const areas = ['Riverside', 'Old Town', 'University', 'Harbour', 'Business Park'];
  const purposes = ['commute', 'errand', 'leisure', 'tourism'];
  const base = { Riverside: [120, 40, 90, 30], 'Old Town': [80, 60, 70, 95], University: [150, 70, 40, 5], Harbour: [40, 25, 85, 110], 'Business Park': [190, 20, 10, 2] };
  const lines = ['area,purpose,riders'];
  for (const area of areas)
    purposes.forEach((purpose, j) => {
      const riders = Math.max(0, Math.round(base[area][j] * (0.85 + 0.3 * random())));
      lines.push(`${area},${purpose},${riders}`);
    });
  write('bike-share-survey.csv', `${lines.join('\n')}\n`);
}

// 3. A European bottling line: fill volumes in ml, semicolon-separated with decimal commas.
{
  const random = generator(33);
  const lines = ['time;line;nozzle;fill_ml'];
  const nozzles = ['D1', 'D2', 'D3', 'D4', 'D5', 'D6'];
  let minute = 0;
  for (let i = 0; i < 900; i++) {
    minute += 1 + Math.floor(random() * 3);
    const line = i % 3 === 0 ? 'L2' : 'L1';
    const nozzle = nozzles[Math.floor(random() * nozzles.length)];
    const spread = line === 'L2' ? 1.6 : 1.1;
    const ml = 500.4 + spread * normal(random);
    const hh = String(6 + Math.floor(minute / 60)).padStart(2, '0');
    const mm = String(minute % 60).padStart(2, '0');
    lines.push(`${hh}:${mm};${line};${nozzle};${ml.toFixed(2).replace('.', ',')}`);
  }
  write('bottling-fill.csv', `${lines.join('\n')}\n`);
}

// 4. A markdown report with a counted table (greenhouse: seed tray × germination outcome).
{
  const random = generator(44);
  const rows = ['coated', 'uncoated', 'pelleted'].map((tray) => {
    const sprouted = 400 + Math.floor(random() * 900);
    const failed = 40 + Math.floor(random() * 160);
    return `| ${tray} | ${sprouted.toLocaleString('en')} | ${failed.toLocaleString('en')} |`;
  });
  const text = [
    '# Germination check, spring sowing',
    '',
    'Seeds counted per tray type after 14 days.',
    '',
    '| tray | sprouted | failed |',
    '|:-----|---------:|-------:|',
    ...rows,
    '',
  ].join('\n');
  write('germination.md', text);
}

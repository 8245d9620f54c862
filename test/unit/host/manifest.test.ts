// The extension manifest as the marketplace and the editor read it: metadata, icon, walkthrough media,
// selection commands offered only in the languages they read, and the keybinding's scope.
import { strict as assert } from 'node:assert';
import { existsSync, readFileSync } from 'node:fs';
import { join } from 'node:path';

const root = join(__dirname, '..', '..', '..');
const pkg = JSON.parse(readFileSync(join(root, 'package.json'), 'utf8'));
const LANGUAGES = 'editorLangId =~ /^(markdown|csv|tsv|plaintext|json|jsonc)$/';

describe('extension manifest', () => {
  it('carries the marketplace metadata and a PNG icon of at least 128×128', () => {
    for (const field of ['repository', 'bugs', 'homepage', 'keywords', 'galleryBanner', 'icon', 'license', 'l10n']) assert.ok(pkg[field], field);
    const png = readFileSync(join(root, pkg.icon));
    assert.equal(png.subarray(1, 4).toString('latin1'), 'PNG');
    assert.ok(png.readUInt32BE(16) >= 128 && png.readUInt32BE(20) >= 128, `icon is ${png.readUInt32BE(16)}×${png.readUInt32BE(20)}`);
    for (const file of ['CHANGELOG.md', 'THIRD-PARTY-NOTICES.md', 'LICENSE']) assert.ok(existsSync(join(root, file)), file);
  });

  it('offers "Test the Selected Table…" only in the languages it reads, in menus and keybinding alike', () => {
    const whens = [
      ...Object.values(pkg.contributes.menus as Record<string, { command: string; when?: string }[]>).flat().filter((m) => m.command === 'countercheck.runOnSelection').map((m) => m.when ?? ''),
      ...pkg.contributes.keybindings.filter((k: { command: string }) => k.command === 'countercheck.runOnSelection').map((k: { when: string }) => k.when),
    ];
    assert.equal(whens.length, 3);
    for (const when of whens) {
      assert.ok(when.includes(LANGUAGES), when);
      assert.doesNotMatch(when, /\|\|/, `an alternative would offer it elsewhere: ${when}`);
    }
  });

  it('has a walkthrough whose every step has a title, a description and media that exist', () => {
    const [walkthrough] = pkg.contributes.walkthroughs;
    assert.equal(walkthrough.steps.length, 5);
    for (const step of walkthrough.steps) {
      const media = step.media.markdown ?? step.media.image;
      assert.ok(existsSync(join(root, media)), media);
      if (media.endsWith('.md')) {
        for (const m of readFileSync(join(root, media), 'utf8').matchAll(/!\[[^\]]+\]\(([^)]+)\)/g)) assert.ok(existsSync(join(root, media, '..', m[1])), m[1]);
      }
    }
    assert.ok(pkg.contributes.commands.some((c: { command: string }) => c.command === 'countercheck.openSampleData'));
    assert.ok(existsSync(join(root, 'media/walkthrough/bakery-defects.csv')));
  });
});

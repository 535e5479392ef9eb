// The engine stays inside the machine (issue: a URL made it try to install
// extension code from the network and write under $HOME). Checked on the
// engine itself: its settings, that they are locked, and that a remote read
// fails at once for want of an extension it may not load.
import { expect, it } from 'vitest';
import { openEngine } from '../../src/io/engine/module.js';
import { describeEngine } from '../engineHelpers.js';

describeEngine('the engine stays inside the machine', () => {
  it('extensions are neither installed nor loaded on their own, secrets are not kept, and its folders are one temporary folder', async () => {
    const engine = await openEngine();
    const rows = await engine.query(
      `SELECT name, value FROM duckdb_settings() WHERE name IN ('autoinstall_known_extensions', 'autoload_known_extensions', 'allow_community_extensions', 'allow_persistent_secrets', 'lock_configuration', 'home_directory', 'extension_directory', 'secret_directory', 'temp_directory') ORDER BY name`,
    );
    const settings = Object.fromEntries(rows.map(([name, value]) => [name, String(value)]));
    expect(settings).toMatchObject({ autoinstall_known_extensions: 'false', autoload_known_extensions: 'false', allow_community_extensions: 'false', allow_persistent_secrets: 'false', lock_configuration: 'true' });
    const home = settings.home_directory;
    expect(home).toMatch(/tabsight-engine-\d+-[0-9a-f]{12}$/);
    for (const name of ['extension_directory', 'secret_directory', 'temp_directory']) expect(settings[name].startsWith(home)).toBe(true);
  });

  it('no query can change the settings', async () => {
    const engine = await openEngine();
    await expect(engine.query('SET autoload_known_extensions = true')).rejects.toThrow(/locked/);
  });

  it('a remote read fails at once: the extension it needs is not loaded and may not be', async () => {
    const engine = await openEngine();
    await expect(engine.query(`SELECT * FROM read_csv('https://example.invalid/data.csv')`)).rejects.toThrow(/httpfs/);
  });
});

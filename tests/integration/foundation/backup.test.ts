import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { AuditEvent } from '@/models';
import { databasePath } from '@/models/db';
import { backupDatabase, restoreDatabase, tableFingerprints, verifyBackup } from '@/lib/db/backup';

const tmp = fs.mkdtempSync(path.join(os.tmpdir(), 'partwise-backup-'));

describe('online backup and restore', () => {
  it('backs up a consistent copy under write load, and a restore reproduces it exactly', async () => {
    for (let i = 0; i < 50; i++) await AuditEvent.create({ action: 'load.before', detail: { i } });

    // Keep writing while the backup runs.
    let writing = true;
    let written = 0;
    const writer = (async () => {
      while (writing) {
        await AuditEvent.create({ action: 'load.during', detail: { n: written } });
        written++;
      }
    })();
    await new Promise((r) => setTimeout(r, 50));
    const backupFile = path.join(tmp, 'under-load.sqlite');
    await backupDatabase(databasePath(), backupFile);
    await new Promise((r) => setTimeout(r, 50));
    writing = false;
    await writer;
    expect(written).toBeGreaterThan(0);

    const snapshot = await tableFingerprints(backupFile);
    const rowsInBackup = snapshot.audit_events.rows;
    expect(rowsInBackup).toBeGreaterThanOrEqual(50);
    expect(rowsInBackup).toBeLessThanOrEqual(50 + written);
    expect((await verifyBackup(backupFile)).migrations).toBeGreaterThan(0);

    const restored = path.join(tmp, 'restored.sqlite');
    await restoreDatabase(backupFile, restored);
    expect(await tableFingerprints(restored)).toEqual(snapshot);

    // Restoring into the live file while its own connection stays open.
    await restoreDatabase(backupFile, databasePath());
    expect(await AuditEvent.count()).toBe(rowsInBackup);
    expect(await tableFingerprints(databasePath())).toEqual(snapshot);
  });

  it('refuses to restore a file that is not a Partwise database, and leaves the live data alone', async () => {
    const before = await AuditEvent.count();
    const junk = path.join(tmp, 'junk.sqlite');
    fs.writeFileSync(junk, 'not a database at all');
    await expect(restoreDatabase(junk, databasePath())).rejects.toThrow(/not a SQLite database/);
    await expect(restoreDatabase(path.join(tmp, 'missing.sqlite'), databasePath())).rejects.toThrow(/does not exist/);
    expect(await AuditEvent.count()).toBe(before);
  });

  it('never overwrites an existing backup file', async () => {
    const file = path.join(tmp, 'once.sqlite');
    await backupDatabase(databasePath(), file);
    await expect(backupDatabase(databasePath(), file)).rejects.toThrow(/already exists/);
  });
});

/**
 * `veil unlock DIR --reader R --session N --reason TEXT`: lifts the washout before session N of
 * one reader's kit. Writes the signed override into the coordinator's copy of the kit (send that
 * file to the reader, who puts it into the kit's overrides/ folder) and records it in the audit log.
 */
import { existsSync } from 'node:fs';
import { audit } from '../store/open.ts';
import { openWorkspace, workspacePath } from '../store/workspace.ts';
import { writeWashoutOverride } from './washout-override.ts';

export class UnlockError extends Error {}

export function unlockSession(studyDir: string, reader: string, session: number, reason: string): string {
  if (!reason.trim()) throw new UnlockError('give the reason for lifting the washout (--reason); it goes into the audit log');
  const ws = openWorkspace(workspacePath(studyDir), { create: false });
  try {
    const kit = ws.db.prepare('SELECT kit_id, path FROM kit WHERE reader_code = ?').get(reader) as { kit_id: string; path: string } | undefined;
    if (!kit) {
      const readers = (ws.db.prepare('SELECT reader_code FROM kit ORDER BY reader_code').all() as { reader_code: string }[]).map((r) => r.reader_code);
      throw new UnlockError(`no kit for reader '${reader}' in this study; readers: ${readers.join(', ')}`);
    }
    const sessions = (ws.db.prepare('SELECT MAX(session) AS n FROM kit_item WHERE reader_code = ?').get(reader) as { n: number }).n;
    if (!Number.isInteger(session) || session < 2 || session > sessions) {
      throw new UnlockError(`session must be a whole number from 2 to ${sessions} (session 1 has no washout before it), got ${session}`);
    }
    if (!existsSync(kit.path)) throw new UnlockError(`the kit folder ${kit.path} is gone; the override is written into it`);
    const key = ws.db.prepare('SELECT private_pem FROM signing_key WHERE id = 1').get() as { private_pem: string };
    const file = writeWashoutOverride(kit.path, { kitId: kit.kit_id, reader, session, reason }, { privatePem: key.private_pem });
    audit(ws.db, 'washout.override', { reader, kitId: kit.kit_id, session, reason, file });
    return file;
  } finally {
    ws.close();
  }
}

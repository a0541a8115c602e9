/**
 * A change and its audit entry are stored together or not at all (server/services/audit.ts):
 * with the audit table refusing every new entry (a trigger), each audited change fails and leaves
 * every table as it was. And the two writers, `audit` (Kysely) and `auditSync` (better-sqlite3,
 * inside synchronous transactions), store the same row for the same entry.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { audit, auditSync, type AuditInput } from '../../server/services/audit';
import { createTestApp, signedInAgent, tableCounts, type TestApp } from '../helpers/test-app';
import { FEDERATION, LEAD, upload } from './imports/helpers';

const KC = `/api/federations/${FEDERATION}`;

let t: TestApp;
let lead: Awaited<ReturnType<typeof signedInAgent>>;

beforeAll(async () => {
  t = await createTestApp({ seed: 'demo' });
  lead = await signedInAgent(t.app, LEAD);
});

afterAll(async () => {
  await t.close();
});

/** Runs `change` while the audit log refuses new entries; answers its status and whether any table changed. */
async function withAuditRefused(change: () => Promise<{ status: number }>) {
  await t.ctx.jobs.idle();
  const before = tableCounts(t.ctx);
  const revoked = () => t.ctx.sqlite.prepare('select count(*) from api_tokens where revoked_at is not null').pluck().get();
  const revokedBefore = revoked();
  t.ctx.sqlite.exec("create trigger refuse_audit before insert on audit_log begin select raise(abort, 'the audit log refuses'); end");
  try {
    const { status } = await change();
    await t.ctx.jobs.idle();
    return { status, unchanged: JSON.stringify(tableCounts(t.ctx)) === JSON.stringify(before) && revoked() === revokedBefore };
  } finally {
    t.ctx.sqlite.exec('drop trigger refuse_audit');
  }
}

describe('an audited change without its audit entry', () => {
  it('a sign-in: no session is started', async () => {
    const result = await withAuditRefused(() =>
      signedInAgent(t.app, LEAD).then(
        () => ({ status: 201 }),
        () => ({ status: 500 }),
      ),
    );
    expect(result).toEqual({ status: 500, unchanged: true });
  });

  it('an API token: neither created nor revoked', async () => {
    expect(await withAuditRefused(() => lead.post(`${KC}/api-tokens`).send({ name: 'Results feed', scope: 'read' }))).toEqual({
      status: 500,
      unchanged: true,
    });
    const created = await lead.post(`${KC}/api-tokens`).send({ name: 'Results feed', scope: 'read' });
    expect(created.status).toBe(201);
    const id = (created.body as { view: { id: number } }).view.id;
    expect(await withAuditRefused(() => lead.delete(`${KC}/api-tokens/${id}`))).toEqual({ status: 500, unchanged: true });
    expect((await lead.delete(`${KC}/api-tokens/${id}`)).status).toBe(204);
  });

  it('an invitation: not revoked', async () => {
    const sent = await lead.post(`${KC}/invitations`).send({ email: 'tamsin.reed@example.test', role: 'researcher' });
    expect(sent.status).toBe(201);
    const id = (sent.body as { invitation: { id: number } }).invitation.id;
    expect(await withAuditRefused(() => lead.delete(`${KC}/invitations/${id}`))).toEqual({ status: 500, unchanged: true });
    const pending = t.ctx.sqlite.prepare('select revoked_at from invitations where id = ?').pluck().get(id);
    expect(pending).toBeNull();
  });

  it('an exercise: not closed', async () => {
    const id = t.ctx.sqlite.prepare("select id from exercises where status = 'open' order by id limit 1").pluck().get() as number;
    expect(id).toBeGreaterThan(0);
    expect(await withAuditRefused(() => lead.post(`${KC}/exercises/${id}/close`))).toEqual({ status: 500, unchanged: true });
    expect(t.ctx.sqlite.prepare('select status from exercises where id = ?').pluck().get(id)).toBe('open');
  });

  it('a checked file: not discarded', async () => {
    const staged = await upload(lead, { name: 'long-valid.csv' });
    expect(staged.status).toBe(200);
    const id = (staged.body as { importId: number }).importId;
    expect(await withAuditRefused(() => lead.delete(`${KC}/imports/${id}`))).toEqual({ status: 500, unchanged: true });
    expect(t.ctx.sqlite.prepare('select status from imports where id = ?').pluck().get(id)).toBe('staged');
  });
});

describe('the two audit writers', () => {
  it('store the same row for the same entry', async () => {
    const entry: AuditInput = {
      federationId: 1,
      userId: null,
      action: 'check.same',
      entity: 'import',
      entityId: 42,
      detail: { counts: { a: 1 } },
    };
    await audit(t.ctx.db, entry);
    auditSync(t.ctx.sqlite, entry);
    auditSync(t.ctx.sqlite, { action: 'check.bare', entity: 'user' });
    await audit(t.ctx.db, { action: 'check.bare', entity: 'user' });
    const rows = (action: string) =>
      t.ctx.sqlite
        .prepare('select federation_id, user_id, action, entity, entity_id, detail from audit_log where action = ? order by id')
        .all(action);
    const same = rows('check.same');
    expect(same).toHaveLength(2);
    expect(same[0]).toEqual(same[1]);
    expect(same[0]).toMatchObject({ federation_id: 1, user_id: null, entity_id: '42', detail: '{"counts":{"a":1}}' });
    const bare = rows('check.bare');
    expect(bare).toHaveLength(2);
    expect(bare[0]).toEqual(bare[1]);
    expect(bare[0]).toMatchObject({ federation_id: null, entity_id: null, detail: '{}' });
  });
});

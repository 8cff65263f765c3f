import { afterAll, describe, expect, it } from 'vitest';
import { closeDb, getDb } from '@/db/connection';
import { peopleById } from '@/lib/dal/assumptions/dto';
import { policyChanges } from '@/lib/dal/overdue-policy';
import { makeUser } from '../../support/users';

afterAll(async () => {
  await closeDb();
});

// The consumer API's reads go through prepared queries (lib/dal/prepared.ts): they must answer what
// the built queries answered, for any number of ids, inside a transaction, and after the pool is
// closed and opened again.
describe('prepared reads', () => {
  it('peopleById finds one to four people (three through the padded prepared query, four through a built one)', async () => {
    const people = [await makeUser('viewer'), await makeUser('analyst'), await makeUser('validator'), await makeUser('admin')];
    const ids = people.map((p) => p.id);
    for (let n = 1; n <= 4; n++) {
      const found = await peopleById(getDb(), [...ids.slice(0, n), null, ids[0]]);
      expect([...found.keys()].sort((x, y) => x - y)).toEqual(ids.slice(0, n).sort((x, y) => x - y));
      for (const p of people.slice(0, n)) expect(found.get(p.id)).toEqual({ id: p.id, name: p.name, email: p.email });
    }
    expect((await peopleById(getDb(), [null])).size).toBe(0);
  });

  it('work inside a transaction and after the pool is closed and opened again', async () => {
    const before = await policyChanges(getDb());
    const inside = await getDb().transaction((tx) => policyChanges(tx));
    expect(inside).toEqual(before);
    await closeDb();
    expect(await policyChanges(getDb())).toEqual(before);
    const u = await makeUser('viewer');
    expect((await peopleById(getDb(), [u.id])).get(u.id)?.email).toBe(u.email);
  });
});

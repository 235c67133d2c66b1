import type { Knex } from 'knex';

const NOTE = 'Carried over from the single hold flag of earlier versions.';

/**
 * Data only: a unit flagged `on_hold` gets a hold in the holds table, so it stays held (fail closed). The holder is whoever
 * issued the unit's latest hold command; without one, the first admin (the note says so), who can then release it.
 */
export async function up(knex: Knex): Promise<void> {
  const held: { id: number }[] = await knex('units').where('on_hold', true).select('id');
  for (const { id } of held) {
    const cmd: { id: string; issued_by: number; issued_at: Date } | undefined = await knex('commands')
      .where({ unit_id: id, kind: 'hold' })
      .orderBy('issued_at', 'desc')
      .first('id', 'issued_by', 'issued_at');
    const admin: { id: number } | undefined = cmd ? undefined : await knex('users').where({ role: 'admin' }).orderBy('id').first('id');
    const by = cmd?.issued_by ?? admin?.id;
    if (by === undefined) continue; // no user at all: nothing in the product can have set the flag
    await knex('unit_holds').insert({
      unit_id: id,
      holder_kind: 'person',
      holder_id: by,
      note: cmd ? NOTE : `${NOTE} Who placed it is not known.`,
      placed_at: cmd?.issued_at ?? new Date(),
      placed_by: by,
      command_id: cmd?.id ?? null,
    });
  }
}

export async function down(knex: Knex): Promise<void> {
  const held: { unit_id: number }[] = await knex('unit_holds').whereNull('released_at').distinct('unit_id');
  if (held.length)
    await knex('units')
      .whereIn(
        'id',
        held.map((h) => h.unit_id),
      )
      .update({ on_hold: true });
}

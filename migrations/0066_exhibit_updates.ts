import type { Knex } from 'knex';

/**
 * Issue 15: exhibit updates. An update is a new exhibit drafted from a published one
 * (`exhibits.update_of`, written when the draft is made, never changed), optionally on a newer
 * vintage than its study pins (`exhibits.vintage_pin`). Publishing the update supersedes the old
 * exhibit: one row in `exhibit_supersessions`, written once (the old exhibit is its key) and never
 * changed or deleted (triggers), so the published exhibit's own row and snapshot stay as they were.
 */
export async function up(knex: Knex) {
  await knex.schema.alterTable('exhibits', (t) => {
    t.integer('update_of').unsigned().nullable().references('exhibits.id').onDelete('RESTRICT');
    t.integer('vintage_pin').unsigned().nullable();
  });
  await knex.schema.createTable('exhibit_supersessions', (t) => {
    t.integer('exhibit_id').unsigned().notNullable().primary().references('exhibits.id').onDelete('RESTRICT');
    t.integer('successor_id').unsigned().notNullable().unique().references('exhibits.id').onDelete('RESTRICT');
    t.integer('created_by').unsigned().nullable().references('users.id').onDelete('SET NULL');
    t.datetime('created_at', { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
  });
  for (const sql of [
    `CREATE TRIGGER exhibit_supersessions_no_update BEFORE UPDATE ON exhibit_supersessions FOR EACH ROW SIGNAL SQLSTATE '45000' SET MESSAGE_TEXT = 'a supersession is written once'`,
    `CREATE TRIGGER exhibit_supersessions_no_delete BEFORE DELETE ON exhibit_supersessions FOR EACH ROW SIGNAL SQLSTATE '45000' SET MESSAGE_TEXT = 'a supersession is written once'`,
  ]) {
    try {
      await knex.raw(sql);
    } catch (error) {
      console.warn(`[migrate] could not create an immutability trigger: ${(error as Error).message}`);
    }
  }
}

export async function down(knex: Knex) {
  for (const name of ['exhibit_supersessions_no_update', 'exhibit_supersessions_no_delete']) await knex.raw(`DROP TRIGGER IF EXISTS ${name}`);
  await knex.schema.dropTableIfExists('exhibit_supersessions');
  await knex.schema.alterTable('exhibits', (t) => {
    t.dropForeign(['update_of']);
    t.dropColumn('update_of');
    t.dropColumn('vintage_pin');
  });
}

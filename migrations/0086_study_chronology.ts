import type { Knex } from 'knex';

/**
 * A study keeps the reference chronology whose contractions its charts shade (issue 14: the choice
 * was lost on leaving the page). Removing a chronology clears the choice.
 */
export async function up(knex: Knex) {
  await knex.schema.alterTable('studies', (t) => {
    t.integer('chronology_id').unsigned().nullable().references('chronologies.id').onDelete('SET NULL');
  });
}

export async function down(knex: Knex) {
  await knex.schema.alterTable('studies', (t) => {
    t.dropForeign(['chronology_id']);
    t.dropColumn('chronology_id');
  });
}

import type { Knex } from 'knex';

/**
 * A study may pin a date instead of a vintage number: it reads the vintage in force on that date
 * (the latest released on or before it). NULL: the study pins a number, or follows "latest".
 */
export async function up(knex: Knex) {
  await knex.schema.alterTable('studies', (t) => {
    t.date('vintage_as_of').nullable();
  });
}

export async function down(knex: Knex) {
  await knex.schema.alterTable('studies', (t) => {
    t.dropColumn('vintage_as_of');
  });
}

import type { Knex } from 'knex';

/**
 * Issue 15: a person's choice to hear when new vintages move their gaps (release alerts). On by
 * default; the Profile page turns it off.
 */
export async function up(knex: Knex) {
  await knex.schema.alterTable('users', (t) => {
    t.boolean('release_alerts').notNullable().defaultTo(true);
  });
}

export async function down(knex: Knex) {
  await knex.schema.alterTable('users', (t) => {
    t.dropColumn('release_alerts');
  });
}

import type { Knex } from 'knex';

/**
 * Issue 15: feeds (scheduled pulls from SDMX REST sources), their run records, and one lease row
 * per feed: the run that holds an unexpired lease is the only one, across every server instance.
 */
export async function up(knex: Knex) {
  await knex.schema.createTable('feeds', (t) => {
    t.increments('id').primary();
    t.string('name', 120).notNullable().unique();
    t.string('url', 2000).notNullable();
    /** [{key, series}]: the SDMX series key in the answer → the Catalogue series' code. */
    t.text('mappings', 'mediumtext').notNullable();
    /** [{name, value}]: sent with every fetch (an API key); answers show the names only. */
    t.text('headers').notNullable();
    /** A cron expression (five fields, UTC); null: run on demand only. */
    t.string('schedule', 120).nullable();
    t.boolean('enabled').notNullable().defaultTo(true);
    t.integer('steward_id').unsigned().notNullable().references('users.id').onDelete('RESTRICT');
    t.integer('created_by').unsigned().nullable().references('users.id').onDelete('SET NULL');
    t.datetime('created_at', { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
    t.datetime('updated_at', { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
  });
  await knex.schema.createTable('feed_leases', (t) => {
    t.integer('feed_id').unsigned().notNullable().primary().references('feeds.id').onDelete('CASCADE');
    t.string('holder', 64).nullable();
    t.datetime('expires_at', { precision: 3 }).nullable();
    /** The last schedule time a run was started for (a scheduled time runs once, whichever instance sees it first). */
    t.datetime('last_slot', { precision: 3 }).nullable();
  });
  await knex.schema.createTable('feed_runs', (t) => {
    t.increments('id').primary();
    t.integer('feed_id').unsigned().notNullable().references('feeds.id').onDelete('CASCADE');
    t.string('trigger', 16).notNullable();
    t.string('outcome', 16).notNullable();
    t.string('holder', 64).notNullable();
    t.datetime('started_at', { precision: 3 }).notNullable();
    t.datetime('finished_at', { precision: 3 }).nullable();
    t.integer('duration_ms').nullable();
    t.text('message').nullable();
    t.integer('load_id').unsigned().nullable().references('loads.id').onDelete('SET NULL');
    /** [{seriesId, code, number, asOf}] the run stored. */
    t.text('vintages').nullable();
    /** [{key, series, problems:[{row, column, message, severity}]}]: problems by series. */
    t.text('problems', 'mediumtext').nullable();
    t.integer('started_by').unsigned().nullable().references('users.id').onDelete('SET NULL');
    t.index(['feed_id', 'id']);
  });
}

export async function down(knex: Knex) {
  await knex.schema.dropTableIfExists('feed_runs');
  await knex.schema.dropTableIfExists('feed_leases');
  await knex.schema.dropTableIfExists('feeds');
}

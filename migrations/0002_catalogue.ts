import type { Knex } from 'knex';

/** Series, loads, vintages and their observations. Vintages and observations never change. */
export async function up(knex: Knex) {
  await knex.schema.createTable('series', (t) => {
    t.increments('id').primary();
    t.string('code', 64).notNullable().unique();
    t.string('title', 300).notNullable();
    t.specificType('frequency', 'CHAR(1)').notNullable();
    t.string('unit', 120).notNullable();
    t.string('seasonal_adjustment', 8).notNullable();
    t.string('source', 300).notNullable().defaultTo('');
    t.text('notes').nullable();
    t.string('sdmx_key', 200).nullable().unique();
    t.integer('created_by').unsigned().nullable().references('users.id').onDelete('SET NULL');
    t.datetime('created_at', { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
    t.datetime('updated_at', { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
  });
  await knex.schema.createTable('loads', (t) => {
    t.increments('id').primary();
    t.integer('created_by').unsigned().nullable().references('users.id').onDelete('SET NULL');
    t.string('filename', 255).notNullable();
    t.string('format', 16).notNullable();
    t.integer('series_count').notNullable();
    t.integer('observation_count').notNullable();
    t.text('note').nullable();
    t.datetime('created_at', { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
  });
  await knex.schema.createTable('vintages', (t) => {
    t.increments('id').primary();
    t.integer('series_id').unsigned().notNullable().references('series.id').onDelete('RESTRICT');
    t.integer('number').unsigned().notNullable();
    t.date('as_of').notNullable();
    t.text('note').nullable();
    t.integer('row_count').unsigned().notNullable();
    t.specificType('checksum', 'CHAR(64)').notNullable();
    t.string('first_period', 7).nullable();
    t.string('last_period', 7).nullable();
    t.integer('load_id').unsigned().nullable().references('loads.id').onDelete('RESTRICT');
    t.integer('created_by').unsigned().nullable().references('users.id').onDelete('SET NULL');
    t.datetime('created_at', { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
    t.unique(['series_id', 'number']);
  });
  await knex.schema.createTable('observations', (t) => {
    t.integer('vintage_id').unsigned().notNullable().references('vintages.id').onDelete('RESTRICT');
    t.string('period', 7).notNullable();
    t.double('value').nullable();
    t.primary(['vintage_id', 'period']);
  });
  // Defence in depth: the database itself refuses to change a stored vintage. Creating triggers
  // can need extra privileges on some deployments (binary logging on); the services enforce the
  // same rule, so a missing trigger weakens nothing the API allows.
  const statements = [
    `CREATE TRIGGER vintages_no_update BEFORE UPDATE ON vintages FOR EACH ROW SIGNAL SQLSTATE '45000' SET MESSAGE_TEXT = 'vintages are immutable'`,
    `CREATE TRIGGER vintages_no_delete BEFORE DELETE ON vintages FOR EACH ROW SIGNAL SQLSTATE '45000' SET MESSAGE_TEXT = 'vintages are immutable'`,
    `CREATE TRIGGER observations_no_update BEFORE UPDATE ON observations FOR EACH ROW SIGNAL SQLSTATE '45000' SET MESSAGE_TEXT = 'observations of a vintage are immutable'`,
    `CREATE TRIGGER observations_no_delete BEFORE DELETE ON observations FOR EACH ROW SIGNAL SQLSTATE '45000' SET MESSAGE_TEXT = 'observations of a vintage are immutable'`,
  ];
  for (const sql of statements) {
    try {
      await knex.raw(sql);
    } catch (error) {
      console.warn(`[migrate] could not create an immutability trigger: ${(error as Error).message}`);
    }
  }
}

export async function down(knex: Knex) {
  for (const name of ['vintages_no_update', 'vintages_no_delete', 'observations_no_update', 'observations_no_delete']) {
    await knex.raw(`DROP TRIGGER IF EXISTS ${name}`);
  }
  for (const table of ['observations', 'vintages', 'loads', 'series']) await knex.schema.dropTableIfExists(table);
}

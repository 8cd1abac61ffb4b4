import type { Knex } from 'knex';

/**
 * The metadata each vintage was loaded under (code, title, frequency, unit, seasonal adjustment,
 * source), so that correcting a series' metadata later never changes what an old vintage's export
 * says. Written with the vintage in the load's transaction; existing vintages take their series'
 * metadata as it is now (the best record there is). Never changed afterwards.
 */
export async function up(knex: Knex) {
  await knex.schema.createTable('vintage_metadata', (t) => {
    t.integer('vintage_id').unsigned().primary().references('vintages.id').onDelete('RESTRICT');
    t.string('code', 64).notNullable();
    t.string('title', 300).notNullable();
    t.specificType('frequency', 'CHAR(1)').notNullable();
    t.string('unit', 120).notNullable();
    t.string('seasonal_adjustment', 8).notNullable();
    t.string('source', 300).notNullable().defaultTo('');
  });
  await knex.raw(
    `INSERT INTO vintage_metadata (vintage_id, code, title, frequency, unit, seasonal_adjustment, source)
     SELECT v.id, s.code, s.title, s.frequency, s.unit, s.seasonal_adjustment, s.source FROM vintages v JOIN series s ON s.id = v.series_id`,
  );
  // As for vintages themselves (0002): the database refuses changes too, where triggers may be made.
  for (const sql of [
    `CREATE TRIGGER vintage_metadata_no_update BEFORE UPDATE ON vintage_metadata FOR EACH ROW SIGNAL SQLSTATE '45000' SET MESSAGE_TEXT = 'the metadata of a vintage is immutable'`,
    `CREATE TRIGGER vintage_metadata_no_delete BEFORE DELETE ON vintage_metadata FOR EACH ROW SIGNAL SQLSTATE '45000' SET MESSAGE_TEXT = 'the metadata of a vintage is immutable'`,
  ]) {
    try {
      await knex.raw(sql);
    } catch (error) {
      console.warn(`[migrate] could not create an immutability trigger: ${(error as Error).message}`);
    }
  }
}

export async function down(knex: Knex) {
  for (const name of ['vintage_metadata_no_update', 'vintage_metadata_no_delete']) await knex.raw(`DROP TRIGGER IF EXISTS ${name}`);
  await knex.schema.dropTableIfExists('vintage_metadata');
}

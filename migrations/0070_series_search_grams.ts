import type { Knex } from 'knex';

/**
 * An index for the Catalogue search (`GET /series?q=`, a substring match on code and title): every
 * three-character piece of each series' code and title, in the collation of those columns. A
 * search looks up a few pieces of its text by primary key to find the candidate series and checks
 * only those with the LIKE it always ran, instead of running that LIKE over every series.
 *
 * Triggers keep the pieces in step with `series` whatever writes it (services, seeds, tests):
 * on insert, on a change of code or title, and by cascade on delete. The search depends on them,
 * so a database where they cannot be made stops the migration with what to change.
 */
const PIECES = `WITH RECURSIVE n(i) AS (SELECT 1 UNION ALL SELECT i + 1 FROM n WHERE i < 298)
  SELECT NEW.id, SUBSTRING(t.txt, n.i, 3) FROM n JOIN (SELECT NEW.code AS txt UNION ALL SELECT NEW.title) t ON n.i <= CHAR_LENGTH(t.txt) - 2`;

export async function up(knex: Knex) {
  await knex.schema.createTable('series_grams', (t) => {
    t.string('gram', 3).notNullable();
    t.integer('series_id').unsigned().notNullable().references('series.id').onDelete('CASCADE');
    t.primary(['gram', 'series_id']);
    t.index(['series_id']);
  });
  await knex.raw(
    `INSERT IGNORE INTO series_grams (series_id, gram)
     WITH RECURSIVE n(i) AS (SELECT 1 UNION ALL SELECT i + 1 FROM n WHERE i < 298)
     SELECT s.id, SUBSTRING(t.txt, n.i, 3) FROM (SELECT id, code AS txt FROM series UNION ALL SELECT id, title FROM series) t
       JOIN series s ON s.id = t.id JOIN n ON n.i <= CHAR_LENGTH(t.txt) - 2`,
  );
  try {
    await knex.raw(`CREATE TRIGGER series_grams_insert AFTER INSERT ON series FOR EACH ROW INSERT IGNORE INTO series_grams (series_id, gram) ${PIECES}`);
    await knex.raw(
      `CREATE TRIGGER series_grams_update AFTER UPDATE ON series FOR EACH ROW
       BEGIN
         IF NOT (NEW.code <=> OLD.code AND NEW.title <=> OLD.title) THEN
           DELETE FROM series_grams WHERE series_id = OLD.id;
           INSERT IGNORE INTO series_grams (series_id, gram) ${PIECES};
         END IF;
       END`,
    );
  } catch (error) {
    await down(knex);
    throw new Error(
      `The Catalogue search needs two triggers on the series table and MariaDB refused them (${(error as Error).message}). ` +
        'Grant the TRIGGER privilege on the database to its user, and with binary logging on set log_bin_trust_function_creators=1, then migrate again.',
    );
  }
}

export async function down(knex: Knex) {
  for (const name of ['series_grams_insert', 'series_grams_update']) await knex.raw(`DROP TRIGGER IF EXISTS ${name}`);
  await knex.schema.dropTableIfExists('series_grams');
}

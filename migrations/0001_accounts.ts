import type { Knex } from 'knex';

/** People, their roles, sessions, invitations, password resets, API tokens, sign-in attempts, audit log. */
export async function up(knex: Knex) {
  await knex.schema.createTable('users', (t) => {
    t.increments('id').primary();
    t.string('email', 254).notNullable().unique();
    t.string('name', 200).notNullable();
    t.string('password_hash', 255).nullable();
    t.enu('status', ['active', 'deactivated']).notNullable().defaultTo('active');
    t.datetime('last_sign_in_at', { precision: 3 }).nullable();
    t.datetime('created_at', { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
    t.datetime('updated_at', { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
  });
  await knex.schema.createTable('user_roles', (t) => {
    t.integer('user_id').unsigned().notNullable().references('users.id').onDelete('CASCADE');
    t.string('role', 20).notNullable();
    t.primary(['user_id', 'role']);
  });
  await knex.schema.createTable('sessions', (t) => {
    t.string('id', 255).primary();
    t.integer('user_id').unsigned().notNullable().references('users.id').onDelete('CASCADE');
    t.datetime('expires_at', { precision: 3 }).notNullable().index();
    t.datetime('created_at', { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
    t.string('ip', 64).nullable();
    t.string('user_agent', 255).nullable();
  });
  await knex.schema.createTable('invitations', (t) => {
    t.increments('id').primary();
    t.string('email', 254).notNullable().index();
    t.text('roles').notNullable();
    t.string('token_hash', 64).notNullable().unique();
    t.integer('invited_by').unsigned().nullable().references('users.id').onDelete('SET NULL');
    t.datetime('expires_at', { precision: 3 }).notNullable();
    t.datetime('accepted_at', { precision: 3 }).nullable();
    t.integer('accepted_user_id').unsigned().nullable().references('users.id').onDelete('SET NULL');
    t.datetime('revoked_at', { precision: 3 }).nullable();
    t.integer('send_count').notNullable().defaultTo(1);
    t.datetime('created_at', { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
  });
  await knex.schema.createTable('password_resets', (t) => {
    t.increments('id').primary();
    t.integer('user_id').unsigned().notNullable().references('users.id').onDelete('CASCADE');
    t.string('token_hash', 64).notNullable().unique();
    t.datetime('expires_at', { precision: 3 }).notNullable();
    t.datetime('used_at', { precision: 3 }).nullable();
    t.datetime('created_at', { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
  });
  await knex.schema.createTable('api_tokens', (t) => {
    t.increments('id').primary();
    t.integer('user_id').unsigned().notNullable().references('users.id').onDelete('CASCADE');
    t.string('name', 100).notNullable();
    t.string('token_hash', 64).notNullable().unique();
    t.string('prefix', 16).notNullable();
    t.datetime('created_at', { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
    t.datetime('last_used_at', { precision: 3 }).nullable();
    t.datetime('revoked_at', { precision: 3 }).nullable();
  });
  await knex.schema.createTable('sign_in_attempts', (t) => {
    t.bigIncrements('id').primary();
    t.string('email', 254).notNullable();
    t.string('ip', 64).notNullable();
    t.boolean('success').notNullable();
    t.datetime('at', { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
    t.index(['email', 'at']);
    t.index(['ip', 'at']);
  });
  await knex.schema.createTable('audit_log', (t) => {
    t.bigIncrements('id').primary();
    t.datetime('at', { precision: 3 }).notNullable().defaultTo(knex.fn.now(3)).index();
    t.integer('actor_id').unsigned().nullable();
    t.string('action', 64).notNullable().index();
    t.string('target_type', 32).nullable();
    t.string('target_id', 64).nullable();
    t.text('details').nullable();
    t.string('ip', 64).nullable();
  });
  await knex.schema.createTable('settings', (t) => {
    t.string('key', 64).primary();
    t.text('value').notNullable();
    t.datetime('updated_at', { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
  });
}

export async function down(knex: Knex) {
  for (const table of ['settings', 'audit_log', 'sign_in_attempts', 'api_tokens', 'password_resets', 'invitations', 'sessions', 'user_roles', 'users']) {
    await knex.schema.dropTableIfExists(table);
  }
}

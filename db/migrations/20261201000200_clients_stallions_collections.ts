import type { Knex } from 'knex';

export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('clients', (t) => {
    t.increments('id').primary();
    t.string('name', 120).notNullable();
    t.enu('kind', ['owner', 'referring_vet']).notNullable().defaultTo('owner');
    t.string('email', 254).nullable();
    t.string('phone', 40).nullable();
    t.string('address', 300).nullable();
    t.text('notes').nullable();
    t.timestamp('created_at', { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
    t.timestamp('updated_at', { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
    t.index(['name']);
  });
  await knex.schema.alterTable('users', (t) => {
    t.integer('client_id').unsigned().nullable().references('clients.id');
  });
  await knex.schema.createTable('stallions', (t) => {
    t.increments('id').primary();
    t.string('name', 120).notNullable();
    t.string('registration', 60).nullable().comment('registration or microchip number');
    t.string('breed', 80).nullable();
    t.smallint('foaling_year').unsigned().nullable();
    t.integer('client_id').unsigned().notNullable().references('clients.id');
    t.text('notes').nullable();
    t.timestamp('created_at', { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
    t.timestamp('updated_at', { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
    t.index(['name']);
    t.unique(['registration']);
  });
  await knex.schema.createTable('collections', (t) => {
    t.increments('id').primary();
    t.integer('stallion_id').unsigned().notNullable().references('stallions.id');
    t.datetime('collected_at', { precision: 3 }).notNullable().comment('UTC');
    t.tinyint('number_that_day').unsigned().notNullable().defaultTo(1);
    t.decimal('volume_ml', 7, 2).nullable().comment('gel-free volume, mL');
    t.decimal('concentration_m_per_ml', 8, 2).nullable().comment('10^6 sperm per mL');
    t.enu('concentration_method', ['entered', 'chamber']).notNullable().defaultTo('entered');
    t.integer('chamber_dilution').unsigned().nullable();
    t.tinyint('chamber_squares').unsigned().nullable();
    t.integer('chamber_count_1').unsigned().nullable();
    t.integer('chamber_count_2').unsigned().nullable();
    t.decimal('total_motility_pct', 5, 2).nullable();
    t.decimal('progressive_motility_pct', 5, 2).nullable();
    t.enu('preparation', ['eosin_nigrosin', 'other_stain', 'fixed_wet_mount']).notNullable().defaultTo('eosin_nigrosin');
    t.enu('optics', ['bright_field', 'dic', 'phase_contrast']).notNullable().defaultTo('bright_field');
    t.smallint('magnification').unsigned().notNullable().defaultTo(1000);
    t.string('collected_by', 120).nullable();
    t.integer('recorded_by').unsigned().notNullable().references('users.id');
    t.text('remarks').nullable();
    t.timestamp('created_at', { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
    t.timestamp('updated_at', { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
    t.index(['stallion_id', 'collected_at']);
    t.index(['collected_at']);
  });
  await knex.schema.createTable('testis_measurements', (t) => {
    t.increments('id').primary();
    t.integer('stallion_id').unsigned().notNullable().references('stallions.id');
    t.date('measured_on').notNullable();
    t.enu('method', ['caliper', 'ultrasound']).notNullable().defaultTo('caliper');
    for (const side of ['left', 'right']) {
      for (const d of ['length', 'width', 'height']) t.decimal(`${side}_${d}_cm`, 5, 2).nullable();
    }
    t.decimal('total_width_cm', 5, 2).nullable().comment('total scrotal width');
    t.integer('recorded_by').unsigned().notNullable().references('users.id');
    t.text('notes').nullable();
    t.timestamp('created_at', { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
    t.index(['stallion_id', 'measured_on']);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTableIfExists('testis_measurements');
  await knex.schema.dropTableIfExists('collections');
  await knex.schema.dropTableIfExists('stallions');
  await knex.schema.alterTable('users', (t) => {
    t.dropForeign(['client_id']);
    t.dropColumn('client_id');
  });
  await knex.schema.dropTableIfExists('clients');
}

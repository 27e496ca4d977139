import type { Knex } from 'knex';

export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('field_images', (t) => {
    t.increments('id').primary();
    t.integer('collection_id').unsigned().notNullable().references('collections.id');
    t.integer('position').unsigned().notNullable().defaultTo(0);
    t.string('file_name', 200).notNullable();
    t.string('format', 10).notNullable();
    t.bigInteger('bytes').unsigned().notNullable();
    t.integer('width').unsigned().notNullable();
    t.integer('height').unsigned().notNullable();
    t.tinyint('bit_depth').unsigned().notNullable().defaultTo(8);
    t.specificType('sha256', 'char(64)').notNullable();
    t.string('original_key', 300).notNullable();
    t.string('display_key', 300).notNullable();
    t.string('thumb_key', 300).notNullable();
    t.integer('display_width').unsigned().notNullable();
    t.integer('display_height').unsigned().notNullable();
    t.decimal('microns_per_pixel', 10, 5).nullable();
    t.smallint('magnification').unsigned().nullable();
    t.enu('optics', ['bright_field', 'dic', 'phase_contrast']).nullable();
    t.integer('uploaded_by').unsigned().notNullable().references('users.id');
    t.timestamp('created_at', { precision: 3 }).notNullable().defaultTo(knex.fn.now(3));
    // The same file twice in one collection is one image.
    t.unique(['collection_id', 'sha256']);
    t.index(['collection_id', 'position']);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTableIfExists('field_images');
}

import { Migration } from '@mikro-orm/migrations'

/**
 * Regions of interest become their own table (on a localization table, in sample nm), comments
 * gain threads (region, resolved state, edit mark, rendered HTML) and recorded mentions.
 * Comments that carried a region as JSON keep it: it becomes a Region on the dataset's first
 * localization table, or, when the dataset has none, its coordinates are appended to the text.
 */
export class Migration20261204221847 extends Migration {
  override async up(): Promise<void> {
    this.addSql(
      `create table \`region\` (\`id\` integer not null primary key autoincrement, \`dataset_id\` integer not null, \`file_id\` integer not null, \`author_id\` integer not null, \`label\` text not null, \`colour\` text not null, \`shape\` text not null, \`geometry\` json not null, \`created_at\` datetime not null, \`updated_at\` datetime not null, constraint \`region_dataset_id_foreign\` foreign key(\`dataset_id\`) references \`dataset\`(\`id\`) on delete cascade on update cascade, constraint \`region_file_id_foreign\` foreign key(\`file_id\`) references \`dataset_file\`(\`id\`) on delete cascade on update cascade, constraint \`region_author_id_foreign\` foreign key(\`author_id\`) references \`user\`(\`id\`) on update cascade);`,
    )
    this.addSql(`create index \`region_dataset_id_index\` on \`region\` (\`dataset_id\`);`)
    this.addSql(`create index \`region_file_id_index\` on \`region\` (\`file_id\`);`)
    this.addSql(`create index \`region_author_id_index\` on \`region\` (\`author_id\`);`)
    this.addSql(
      `create index \`region_file_id_created_at_index\` on \`region\` (\`file_id\`, \`created_at\`);`,
    )
    this.addSql(
      `create index \`region_dataset_id_created_at_index\` on \`region\` (\`dataset_id\`, \`created_at\`);`,
    )

    this.addSql(
      `create table \`comment_mention\` (\`id\` integer not null primary key autoincrement, \`comment_id\` integer not null, \`user_id\` integer not null, constraint \`comment_mention_comment_id_foreign\` foreign key(\`comment_id\`) references \`comment\`(\`id\`) on delete cascade on update cascade, constraint \`comment_mention_user_id_foreign\` foreign key(\`user_id\`) references \`user\`(\`id\`) on delete cascade on update cascade);`,
    )
    this.addSql(
      `create index \`comment_mention_comment_id_index\` on \`comment_mention\` (\`comment_id\`);`,
    )
    this.addSql(`create index \`comment_mention_user_id_index\` on \`comment_mention\` (\`user_id\`);`)
    this.addSql(
      `create index \`comment_mention_user_id_comment_id_index\` on \`comment_mention\` (\`user_id\`, \`comment_id\`);`,
    )
    this.addSql(
      `create unique index \`comment_mention_comment_id_user_id_unique\` on \`comment_mention\` (\`comment_id\`, \`user_id\`);`,
    )

    this.addSql(
      `alter table \`comment\` add column \`region_id\` integer null constraint \`comment_region_id_foreign\` references \`region\` (\`id\`) on update cascade on delete cascade;`,
    )
    this.addSql(`alter table \`comment\` add column \`body_html\` text not null default '';`)
    this.addSql(`alter table \`comment\` add column \`edited_at\` datetime null;`)
    this.addSql(`alter table \`comment\` add column \`resolved_at\` datetime null;`)
    this.addSql(
      `alter table \`comment\` add column \`resolved_by_id\` integer null constraint \`comment_resolved_by_id_foreign\` references \`user\` (\`id\`) on update cascade on delete set null;`,
    )
    this.addSql(`create index \`comment_region_id_index\` on \`comment\` (\`region_id\`);`)
    this.addSql(`create index \`comment_resolved_by_id_index\` on \`comment\` (\`resolved_by_id\`);`)
    this.addSql(
      `create index \`comment_region_id_created_at_index\` on \`comment\` (\`region_id\`, \`created_at\`);`,
    )

    this.migrateCommentRegions()
    this.addSql(`alter table \`comment\` drop column \`region\`;`)
  }

  /** The old JSON ({shape, pointsNm}) as GeoJSON in nm: a rectangle's two corners become a ring. */
  private migrateCommentRegions() {
    const firstTable = `(select f.id from dataset_file f where f.dataset_id = c.dataset_id and f.kind = 'localization_table' order by f.id limit 1)`
    const p = (i: number, axis: number) => `json_extract(c.region, '$.pointsNm[${i}][${axis}]')`
    const rectangle = `json_array(json_array(json_array(${p(0, 0)}, ${p(0, 1)}), json_array(${p(1, 0)}, ${p(0, 1)}), json_array(${p(1, 0)}, ${p(1, 1)}), json_array(${p(0, 0)}, ${p(1, 1)}), json_array(${p(0, 0)}, ${p(0, 1)})))`
    const polygon = `json_array(json_insert(json_extract(c.region, '$.pointsNm'), '$[#]', json_extract(c.region, '$.pointsNm[0]')))`
    const geometry = `case json_extract(c.region, '$.shape')
        when 'point' then json_object('type', 'Point', 'coordinates', json_extract(c.region, '$.pointsNm[0]'))
        when 'rectangle' then json_object('type', 'Polygon', 'coordinates', json(${rectangle}))
        else json_object('type', 'Polygon', 'coordinates', json(${polygon})) end`
    this.addSql(
      `insert into region (dataset_id, file_id, author_id, label, colour, shape, geometry, created_at, updated_at)
       select c.dataset_id, ${firstTable}, c.author_id, 'Region of comment ' || c.id, '#e08a3c',
         json_extract(c.region, '$.shape'), ${geometry}, c.created_at, c.created_at
       from comment c where c.region is not null and ${firstTable} is not null;`,
    )
    this.addSql(
      `update comment set region_id = (select r.id from region r where r.dataset_id = comment.dataset_id and r.label = 'Region of comment ' || comment.id)
       where region is not null;`,
    )
    this.addSql(
      `update comment set body = body || char(10) || char(10) || '(Region in sample nm: ' || region || ')'
       where region is not null and region_id is null;`,
    )
  }
}

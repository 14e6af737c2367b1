import { Migration } from '@mikro-orm/migrations';

export class Migration20261203094922 extends Migration {
  override async up(): Promise<void> {
    this.addSql("create table `load_series` (`line_id` text not null, `first_at` text not null, `last_at` text not null, `reading_count` integer not null, `day_count` integer not null, `imported_by_id` text not null, `imported_at` datetime not null, primary key (`line_id`))");
    this.addSql("create table `load_series_days` (`line_id` text not null, `day` text not null, `reading_count` integer not null, `readings` blob not null, primary key (`line_id`, `day`))");
  }
}

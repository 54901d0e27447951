CREATE TABLE `air_tests` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`compressor_id` integer NOT NULL,
	`site_id` integer NOT NULL,
	`sampled_at` integer NOT NULL,
	`sample_point` text NOT NULL,
	`fill_bar` real NOT NULL,
	`laboratory` text NOT NULL,
	`certificate_no` text NOT NULL,
	`standard` text NOT NULL,
	`oxygen_pct` real,
	`co2_ppm` real,
	`co_ppm` real,
	`oil_mg_m3` real,
	`water_value` real,
	`water_unit` text NOT NULL,
	`hydrocarbons_ppm` real,
	`odour_ok` integer,
	`passed` integer NOT NULL,
	`verdict` text NOT NULL,
	`certificate_attachment_id` integer,
	`note` text DEFAULT '' NOT NULL,
	`created_by` integer NOT NULL,
	`created_at` integer NOT NULL,
	FOREIGN KEY (`compressor_id`) REFERENCES `compressors`(`id`) ON UPDATE no action ON DELETE no action
);
--> statement-breakpoint
CREATE INDEX `air_tests_compressor_idx` ON `air_tests` (`compressor_id`,`sampled_at`);--> statement-breakpoint
CREATE INDEX `air_tests_site_idx` ON `air_tests` (`site_id`,`sampled_at`);--> statement-breakpoint
CREATE TABLE `cartridge_changes` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`compressor_id` integer NOT NULL,
	`site_id` integer NOT NULL,
	`changed_at` integer NOT NULL,
	`hour_meter_h` real NOT NULL,
	`lot` text NOT NULL,
	`note` text DEFAULT '' NOT NULL,
	`photo_attachment_id` integer,
	`created_by` integer NOT NULL,
	`created_at` integer NOT NULL,
	FOREIGN KEY (`compressor_id`) REFERENCES `compressors`(`id`) ON UPDATE no action ON DELETE no action
);
--> statement-breakpoint
CREATE INDEX `cartridge_changes_compressor_idx` ON `cartridge_changes` (`compressor_id`,`changed_at`);--> statement-breakpoint
CREATE INDEX `cartridge_changes_site_idx` ON `cartridge_changes` (`site_id`,`changed_at`);--> statement-breakpoint
CREATE TABLE `purifier_ratings` (
	`scope_type` text NOT NULL,
	`scope_id` integer NOT NULL,
	`kind` text NOT NULL,
	`value` real NOT NULL,
	`ref_bar` real NOT NULL,
	`ref_c` real NOT NULL,
	`advisory_pct` real DEFAULT 80 NOT NULL,
	`updated_at` integer NOT NULL,
	`updated_by` integer,
	PRIMARY KEY(`scope_type`, `scope_id`)
);
--> statement-breakpoint
CREATE TABLE `purifier_usage` (
	`compressor_id` integer PRIMARY KEY NOT NULL,
	`since_ts` integer NOT NULL,
	`through_ts` integer NOT NULL,
	`water_g` real DEFAULT 0 NOT NULL,
	`run_s` real DEFAULT 0 NOT NULL,
	`free_air_m3` real DEFAULT 0 NOT NULL,
	`spec_key` text DEFAULT '' NOT NULL,
	`used_pct` real,
	`advisory_pct` real,
	`updated_at` integer NOT NULL
);
--> statement-breakpoint
CREATE TABLE `site_air_settings` (
	`site_id` integer PRIMARY KEY NOT NULL,
	`standard` text DEFAULT 'en12021' NOT NULL,
	`interval_days` integer DEFAULT 91 NOT NULL,
	`updated_at` integer NOT NULL,
	`updated_by` integer,
	FOREIGN KEY (`site_id`) REFERENCES `sites`(`id`) ON UPDATE no action ON DELETE cascade
);
--> statement-breakpoint
ALTER TABLE `compressor_models` ADD `back_pressure_bar` real DEFAULT 150 NOT NULL;--> statement-breakpoint
ALTER TABLE `readings` ADD `purifier_bar` real;--> statement-breakpoint
ALTER TABLE `readings_1h` ADD `purifier_bar_min` real;--> statement-breakpoint
ALTER TABLE `readings_1h` ADD `purifier_bar_max` real;--> statement-breakpoint
ALTER TABLE `readings_1h` ADD `purifier_bar_sum` real DEFAULT 0 NOT NULL;--> statement-breakpoint
ALTER TABLE `readings_1h` ADD `purifier_bar_n` integer DEFAULT 0 NOT NULL;--> statement-breakpoint
ALTER TABLE `readings_1m` ADD `purifier_bar_min` real;--> statement-breakpoint
ALTER TABLE `readings_1m` ADD `purifier_bar_max` real;--> statement-breakpoint
ALTER TABLE `readings_1m` ADD `purifier_bar_sum` real DEFAULT 0 NOT NULL;--> statement-breakpoint
ALTER TABLE `readings_1m` ADD `purifier_bar_n` integer DEFAULT 0 NOT NULL;
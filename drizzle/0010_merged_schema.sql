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
CREATE TABLE `attachments` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`owner_kind` text NOT NULL,
	`owner_id` integer NOT NULL,
	`compressor_id` integer NOT NULL,
	`site_id` integer NOT NULL,
	`status` text NOT NULL,
	`key` text,
	`name` text NOT NULL,
	`content_type` text DEFAULT '' NOT NULL,
	`size` integer DEFAULT 0 NOT NULL,
	`sha256` text,
	`error` text,
	`uploaded_by` integer,
	`uploaded_by_name` text DEFAULT '' NOT NULL,
	`uploaded_at` integer NOT NULL
);
--> statement-breakpoint
CREATE UNIQUE INDEX `attachments_key_unique` ON `attachments` (`key`);--> statement-breakpoint
CREATE INDEX `attachments_owner_idx` ON `attachments` (`owner_kind`,`owner_id`);--> statement-breakpoint
CREATE INDEX `attachments_site_idx` ON `attachments` (`site_id`,`uploaded_at`);--> statement-breakpoint
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
CREATE TABLE `fill_deliveries` (
	`compressor_id` integer NOT NULL,
	`start_ts` integer NOT NULL,
	`end_ts` integer NOT NULL,
	`from_bar` real NOT NULL,
	`to_bar` real NOT NULL,
	`bank_c` real NOT NULL,
	`free_air_l` real NOT NULL,
	`delivery_lpm` real NOT NULL,
	`rated_lpm` real NOT NULL,
	`share` real NOT NULL,
	PRIMARY KEY(`compressor_id`, `start_ts`)
);
--> statement-breakpoint
CREATE INDEX `fill_deliveries_end_idx` ON `fill_deliveries` (`compressor_id`,`end_ts`,`share`,`delivery_lpm`,`rated_lpm`);--> statement-breakpoint
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
CREATE TABLE `service_log` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`compressor_id` integer NOT NULL,
	`site_id` integer NOT NULL,
	`done_at` integer NOT NULL,
	`hour_meter_h` real,
	`tasks` text NOT NULL,
	`parts` text DEFAULT '' NOT NULL,
	`notes` text DEFAULT '' NOT NULL,
	`performed_by` integer,
	`performed_by_name` text DEFAULT '' NOT NULL,
	`submission_id` text NOT NULL,
	`created_at` integer NOT NULL,
	`corrected_at` integer,
	`corrected_by` integer,
	FOREIGN KEY (`compressor_id`) REFERENCES `compressors`(`id`) ON UPDATE no action ON DELETE no action
);
--> statement-breakpoint
CREATE UNIQUE INDEX `service_log_submission_id_unique` ON `service_log` (`submission_id`);--> statement-breakpoint
CREATE INDEX `service_log_compressor_idx` ON `service_log` (`compressor_id`,`done_at`);--> statement-breakpoint
CREATE INDEX `service_log_site_idx` ON `service_log` (`site_id`,`done_at`);--> statement-breakpoint
CREATE TABLE `service_tasks` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`scope_type` text NOT NULL,
	`scope_id` integer NOT NULL,
	`code` text NOT NULL,
	`name` text NOT NULL,
	`every_hours` real,
	`every_months` integer,
	`enabled` integer DEFAULT true NOT NULL,
	`note` text DEFAULT '' NOT NULL,
	`updated_at` integer NOT NULL,
	`updated_by` integer
);
--> statement-breakpoint
CREATE UNIQUE INDEX `service_tasks_key_idx` ON `service_tasks` (`scope_type`,`scope_id`,`code`);--> statement-breakpoint
CREATE TABLE `service_windows` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`compressor_id` integer NOT NULL,
	`site_id` integer NOT NULL,
	`start_at` integer NOT NULL,
	`end_at` integer NOT NULL,
	`reason` text NOT NULL,
	`created_by` integer,
	`created_at` integer NOT NULL,
	FOREIGN KEY (`compressor_id`) REFERENCES `compressors`(`id`) ON UPDATE no action ON DELETE no action
);
--> statement-breakpoint
CREATE INDEX `service_windows_compressor_idx` ON `service_windows` (`compressor_id`,`start_at`);--> statement-breakpoint
CREATE TABLE `sign_in_attempts` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`ts` integer NOT NULL,
	`account` text NOT NULL,
	`address` text NOT NULL,
	`pending` integer DEFAULT true NOT NULL
);
--> statement-breakpoint
CREATE INDEX `sign_in_attempts_account_idx` ON `sign_in_attempts` (`account`,`ts`);--> statement-breakpoint
CREATE INDEX `sign_in_attempts_address_idx` ON `sign_in_attempts` (`address`,`ts`);--> statement-breakpoint
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
ALTER TABLE `display_links` ADD `theme` text DEFAULT 'dark' NOT NULL;--> statement-breakpoint
ALTER TABLE `display_links` ADD `pressure_unit` text DEFAULT 'bar' NOT NULL;--> statement-breakpoint
ALTER TABLE `display_links` ADD `temperature_unit` text DEFAULT 'C' NOT NULL;--> statement-breakpoint
ALTER TABLE `readings` ADD `purifier_bar` real;--> statement-breakpoint
ALTER TABLE `readings` ADD `implausible` text;--> statement-breakpoint
ALTER TABLE `readings_1h` ADD `purifier_bar_min` real;--> statement-breakpoint
ALTER TABLE `readings_1h` ADD `purifier_bar_max` real;--> statement-breakpoint
ALTER TABLE `readings_1h` ADD `purifier_bar_sum` real DEFAULT 0 NOT NULL;--> statement-breakpoint
ALTER TABLE `readings_1h` ADD `purifier_bar_n` integer DEFAULT 0 NOT NULL;--> statement-breakpoint
ALTER TABLE `readings_1m` ADD `purifier_bar_min` real;--> statement-breakpoint
ALTER TABLE `readings_1m` ADD `purifier_bar_max` real;--> statement-breakpoint
ALTER TABLE `readings_1m` ADD `purifier_bar_sum` real DEFAULT 0 NOT NULL;--> statement-breakpoint
ALTER TABLE `readings_1m` ADD `purifier_bar_n` integer DEFAULT 0 NOT NULL;--> statement-breakpoint
ALTER TABLE `users` ADD `all_sites` integer DEFAULT false NOT NULL;
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
CREATE INDEX `service_windows_compressor_idx` ON `service_windows` (`compressor_id`,`start_at`);
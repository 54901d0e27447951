CREATE TABLE `audit_log` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`ts` integer NOT NULL,
	`actor_user_id` integer,
	`actor` text NOT NULL,
	`action` text NOT NULL,
	`target_type` text,
	`target_id` text,
	`site_id` integer,
	`ip` text DEFAULT '' NOT NULL,
	`details` text
);
--> statement-breakpoint
CREATE INDEX `audit_log_ts_idx` ON `audit_log` (`ts`);--> statement-breakpoint
CREATE INDEX `audit_log_action_actor_idx` ON `audit_log` (`action`,`actor`,`ts`);--> statement-breakpoint
CREATE INDEX `audit_log_action_ip_idx` ON `audit_log` (`action`,`ip`,`ts`);--> statement-breakpoint
CREATE TABLE `compressor_models` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`name` text NOT NULL,
	`maker` text DEFAULT '' NOT NULL,
	`stages` integer NOT NULL,
	`rated_delivery_lpm` real NOT NULL,
	`rated_pressure_bar` real NOT NULL,
	`created_at` integer NOT NULL
);
--> statement-breakpoint
CREATE UNIQUE INDEX `compressor_models_name_unique` ON `compressor_models` (`name`);--> statement-breakpoint
CREATE TABLE `compressors` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`site_id` integer NOT NULL,
	`model_id` integer NOT NULL,
	`name` text NOT NULL,
	`serial` text NOT NULL,
	`device_id` text NOT NULL,
	`device_secret_hash` text,
	`stop_pressure_bar` real NOT NULL,
	`restart_pressure_bar` real NOT NULL,
	`bank_volume_l` real DEFAULT 0 NOT NULL,
	`in_service` integer DEFAULT true NOT NULL,
	`created_at` integer NOT NULL,
	`updated_at` integer NOT NULL,
	FOREIGN KEY (`site_id`) REFERENCES `sites`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`model_id`) REFERENCES `compressor_models`(`id`) ON UPDATE no action ON DELETE no action
);
--> statement-breakpoint
CREATE UNIQUE INDEX `compressors_serial_unique` ON `compressors` (`serial`);--> statement-breakpoint
CREATE UNIQUE INDEX `compressors_device_id_unique` ON `compressors` (`device_id`);--> statement-breakpoint
CREATE INDEX `compressors_site_idx` ON `compressors` (`site_id`);--> statement-breakpoint
CREATE TABLE `readings` (
	`compressor_id` integer NOT NULL,
	`ts` integer NOT NULL,
	`seq` integer NOT NULL,
	`delivery_bar` real,
	`stage1_bar` real,
	`stage2_bar` real,
	`stage3_bar` real,
	`stage4_bar` real,
	`stage1_c` real,
	`stage2_c` real,
	`stage3_c` real,
	`stage4_c` real,
	`oil_bar` real,
	`purifier_c` real,
	`intake_c` real,
	`run_state` integer NOT NULL,
	`motor_on` integer NOT NULL,
	`hour_meter_h` real,
	`starts` integer,
	`trip_code` integer,
	PRIMARY KEY(`compressor_id`, `ts`)
);
--> statement-breakpoint
CREATE TABLE `settings` (
	`key` text PRIMARY KEY NOT NULL,
	`value` text NOT NULL,
	`updated_at` integer DEFAULT (unixepoch() * 1000) NOT NULL
);
--> statement-breakpoint
CREATE TABLE `sites` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`name` text NOT NULL,
	`code` text NOT NULL,
	`time_zone` text NOT NULL,
	`address` text DEFAULT '' NOT NULL,
	`created_at` integer NOT NULL
);
--> statement-breakpoint
CREATE UNIQUE INDEX `sites_name_unique` ON `sites` (`name`);--> statement-breakpoint
CREATE UNIQUE INDEX `sites_code_unique` ON `sites` (`code`);--> statement-breakpoint
CREATE TABLE `user_sessions` (
	`id` text PRIMARY KEY NOT NULL,
	`user_id` integer NOT NULL,
	`created_at` integer NOT NULL,
	`last_seen_at` integer NOT NULL,
	`revoked_at` integer,
	`ip` text DEFAULT '' NOT NULL,
	FOREIGN KEY (`user_id`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE cascade
);
--> statement-breakpoint
CREATE INDEX `user_sessions_user_idx` ON `user_sessions` (`user_id`);--> statement-breakpoint
CREATE TABLE `user_sites` (
	`user_id` integer NOT NULL,
	`site_id` integer NOT NULL,
	PRIMARY KEY(`user_id`, `site_id`),
	FOREIGN KEY (`user_id`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE cascade,
	FOREIGN KEY (`site_id`) REFERENCES `sites`(`id`) ON UPDATE no action ON DELETE cascade
);
--> statement-breakpoint
CREATE TABLE `users` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`email` text NOT NULL,
	`name` text NOT NULL,
	`password_hash` text NOT NULL,
	`role` text DEFAULT 'viewer' NOT NULL,
	`disabled` integer DEFAULT false NOT NULL,
	`pressure_unit` text DEFAULT 'bar' NOT NULL,
	`temperature_unit` text DEFAULT 'C' NOT NULL,
	`created_at` integer NOT NULL,
	`updated_at` integer NOT NULL
);
--> statement-breakpoint
CREATE UNIQUE INDEX `users_email_unique` ON `users` (`email`);
CREATE TABLE `alarms` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`compressor_id` integer NOT NULL,
	`site_id` integer NOT NULL,
	`key` text NOT NULL,
	`priority` text NOT NULL,
	`signal` text,
	`state` text NOT NULL,
	`active` integer NOT NULL,
	`raised_at` integer NOT NULL,
	`cleared_at` integer,
	`value` real,
	`limit_value` real,
	`trip_code` integer,
	`chattering` integer DEFAULT false NOT NULL,
	`ack_at` integer,
	`ack_by` integer,
	`ack_comment` text,
	`shelved_until` integer,
	`shelved_by` integer,
	`shelve_comment` text,
	`out_of_service_reason` text,
	`notified_at` integer,
	`escalation_level` integer DEFAULT 0 NOT NULL,
	`re_alarmed_at` integer,
	`updated_at` integer NOT NULL
);
--> statement-breakpoint
CREATE UNIQUE INDEX `alarms_open_idx` ON `alarms` (`compressor_id`,`key`) WHERE state <> 'normal';--> statement-breakpoint
CREATE INDEX `alarms_state_idx` ON `alarms` (`state`,`priority`);--> statement-breakpoint
CREATE INDEX `alarms_compressor_idx` ON `alarms` (`compressor_id`,`raised_at`);--> statement-breakpoint
CREATE INDEX `alarms_site_idx` ON `alarms` (`site_id`,`raised_at`);--> statement-breakpoint
CREATE TABLE `events` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`ts` integer NOT NULL,
	`kind` text NOT NULL,
	`action` text NOT NULL,
	`priority` text,
	`site_id` integer,
	`compressor_id` integer,
	`alarm_id` integer,
	`actor` text DEFAULT '' NOT NULL,
	`text` text NOT NULL,
	`details` text
);
--> statement-breakpoint
CREATE INDEX `events_ts_idx` ON `events` (`ts`);--> statement-breakpoint
CREATE INDEX `events_site_ts_idx` ON `events` (`site_id`,`ts`);--> statement-breakpoint
CREATE INDEX `events_compressor_ts_idx` ON `events` (`compressor_id`,`ts`);--> statement-breakpoint
CREATE INDEX `events_kind_ts_idx` ON `events` (`kind`,`ts`);--> statement-breakpoint
CREATE TABLE `threshold_limits` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`scope_type` text NOT NULL,
	`scope_id` integer NOT NULL,
	`signal` text NOT NULL,
	`direction` text NOT NULL,
	`priority` text NOT NULL,
	`value` real NOT NULL,
	`deadband` real DEFAULT 0 NOT NULL,
	`on_delay_s` real DEFAULT 0 NOT NULL,
	`off_delay_s` real DEFAULT 0 NOT NULL,
	`enabled` integer DEFAULT true NOT NULL,
	`updated_at` integer NOT NULL,
	`updated_by` integer
);
--> statement-breakpoint
CREATE UNIQUE INDEX `threshold_limits_key_idx` ON `threshold_limits` (`scope_type`,`scope_id`,`signal`,`direction`,`priority`);--> statement-breakpoint
CREATE TABLE `threshold_sets` (
	`scope_type` text NOT NULL,
	`scope_id` integer NOT NULL,
	`version` integer DEFAULT 0 NOT NULL,
	`updated_at` integer NOT NULL,
	`updated_by` integer,
	PRIMARY KEY(`scope_type`, `scope_id`)
);

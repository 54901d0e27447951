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
ALTER TABLE `display_links` ADD `theme` text DEFAULT 'dark' NOT NULL;--> statement-breakpoint
ALTER TABLE `display_links` ADD `pressure_unit` text DEFAULT 'bar' NOT NULL;--> statement-breakpoint
ALTER TABLE `display_links` ADD `temperature_unit` text DEFAULT 'C' NOT NULL;--> statement-breakpoint
ALTER TABLE `readings` ADD `implausible` text;
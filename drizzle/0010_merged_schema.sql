ALTER TABLE `display_links` ADD `theme` text DEFAULT 'dark' NOT NULL;--> statement-breakpoint
ALTER TABLE `display_links` ADD `pressure_unit` text DEFAULT 'bar' NOT NULL;--> statement-breakpoint
ALTER TABLE `display_links` ADD `temperature_unit` text DEFAULT 'C' NOT NULL;--> statement-breakpoint
ALTER TABLE `readings` ADD `implausible` text;
ALTER TABLE `readings_1h` ADD `first_ts` integer;--> statement-breakpoint
ALTER TABLE `readings_1h` ADD `min_run_state` integer;--> statement-breakpoint
ALTER TABLE `readings_1h` ADD `max_run_state` integer;--> statement-breakpoint
ALTER TABLE `readings_1h` ADD `min_starts` integer;--> statement-breakpoint
ALTER TABLE `readings_1h` ADD `max_starts` integer;--> statement-breakpoint
ALTER TABLE `readings_1m` ADD `first_ts` integer;--> statement-breakpoint
ALTER TABLE `readings_1m` ADD `min_run_state` integer;--> statement-breakpoint
ALTER TABLE `readings_1m` ADD `max_run_state` integer;--> statement-breakpoint
ALTER TABLE `readings_1m` ADD `min_starts` integer;--> statement-breakpoint
ALTER TABLE `readings_1m` ADD `max_starts` integer;
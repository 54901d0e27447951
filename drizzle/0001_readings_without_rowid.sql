-- Drizzle cannot declare WITHOUT ROWID; the same columns and key, stored clustered on (compressor_id, ts).
CREATE TABLE `readings_new` (
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
) WITHOUT ROWID;
--> statement-breakpoint
INSERT INTO `readings_new` SELECT * FROM `readings`;
--> statement-breakpoint
DROP TABLE `readings`;
--> statement-breakpoint
ALTER TABLE `readings_new` RENAME TO `readings`;

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
ALTER TABLE `users` ADD `all_sites` integer DEFAULT false NOT NULL;
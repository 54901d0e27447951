CREATE TABLE `contacts` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`name` text NOT NULL,
	`email` text NOT NULL,
	`user_id` integer,
	`active` integer DEFAULT true NOT NULL,
	`note` text DEFAULT '' NOT NULL,
	`created_at` integer NOT NULL,
	`updated_at` integer NOT NULL,
	FOREIGN KEY (`user_id`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE set null
);
--> statement-breakpoint
CREATE UNIQUE INDEX `contacts_email_unique` ON `contacts` (`email`);--> statement-breakpoint
CREATE TABLE `mail_outbox` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`key` text NOT NULL,
	`kind` text NOT NULL,
	`priority` text,
	`site_id` integer,
	`alarm_id` integer,
	`thread_id` integer,
	`contact_id` integer,
	`to_address` text NOT NULL,
	`to_name` text DEFAULT '' NOT NULL,
	`subject` text NOT NULL,
	`text` text NOT NULL,
	`html` text NOT NULL,
	`message_id` text NOT NULL,
	`status` text DEFAULT 'pending' NOT NULL,
	`attempts` integer DEFAULT 0 NOT NULL,
	`next_attempt_at` integer NOT NULL,
	`claim_token` text,
	`claimed_at` integer,
	`sent_at` integer,
	`server_message_id` text,
	`server_response` text,
	`last_error` text,
	`created_at` integer NOT NULL,
	`updated_at` integer NOT NULL
);
--> statement-breakpoint
CREATE UNIQUE INDEX `mail_outbox_key_unique` ON `mail_outbox` (`key`);--> statement-breakpoint
CREATE UNIQUE INDEX `mail_outbox_message_id_unique` ON `mail_outbox` (`message_id`);--> statement-breakpoint
CREATE INDEX `mail_outbox_due_idx` ON `mail_outbox` (`status`,`next_attempt_at`);--> statement-breakpoint
CREATE INDEX `mail_outbox_alarm_idx` ON `mail_outbox` (`alarm_id`);--> statement-breakpoint
CREATE INDEX `mail_outbox_created_idx` ON `mail_outbox` (`created_at`);--> statement-breakpoint
CREATE TABLE `mail_received` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`received_at` integer NOT NULL,
	`message_id` text,
	`duplicate_of` integer,
	`envelope_from` text DEFAULT '' NOT NULL,
	`envelope_to` text NOT NULL,
	`from_text` text DEFAULT '' NOT NULL,
	`to_text` text DEFAULT '' NOT NULL,
	`subject` text DEFAULT '' NOT NULL,
	`text` text DEFAULT '' NOT NULL,
	`html` text,
	`headers` text NOT NULL,
	`size` integer NOT NULL,
	`remote_address` text DEFAULT '' NOT NULL
);
--> statement-breakpoint
CREATE INDEX `mail_received_message_id_idx` ON `mail_received` (`message_id`);--> statement-breakpoint
CREATE INDEX `mail_received_at_idx` ON `mail_received` (`received_at`);--> statement-breakpoint
CREATE TABLE `notification_rules` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`site_id` integer,
	`min_priority` text NOT NULL,
	`target` text NOT NULL,
	`contact_id` integer,
	`mode` text DEFAULT 'chain' NOT NULL,
	`position` integer DEFAULT 0 NOT NULL,
	`escalate_after_min` integer,
	`enabled` integer DEFAULT true NOT NULL,
	`created_at` integer NOT NULL,
	`updated_at` integer NOT NULL,
	FOREIGN KEY (`site_id`) REFERENCES `sites`(`id`) ON UPDATE no action ON DELETE cascade,
	FOREIGN KEY (`contact_id`) REFERENCES `contacts`(`id`) ON UPDATE no action ON DELETE cascade
);
--> statement-breakpoint
CREATE INDEX `notification_rules_site_idx` ON `notification_rules` (`site_id`);--> statement-breakpoint
CREATE TABLE `notify_alarms` (
	`alarm_id` integer PRIMARY KEY NOT NULL,
	`thread_id` integer NOT NULL,
	`site_id` integer NOT NULL,
	`handled_at` integer NOT NULL,
	FOREIGN KEY (`thread_id`) REFERENCES `notify_threads`(`id`) ON UPDATE no action ON DELETE cascade
);
--> statement-breakpoint
CREATE INDEX `notify_alarms_thread_idx` ON `notify_alarms` (`thread_id`);--> statement-breakpoint
CREATE TABLE `notify_threads` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`key` text NOT NULL,
	`kind` text NOT NULL,
	`site_id` integer NOT NULL,
	`priority` text NOT NULL,
	`window_start` integer NOT NULL,
	`window_end` integer,
	`level` integer DEFAULT 0 NOT NULL,
	`last_step_at` integer NOT NULL,
	`next_step_at` integer,
	`contact_ids` text NOT NULL,
	`re_alarm_seen_at` integer,
	`resolved_at` integer,
	`created_at` integer NOT NULL,
	`updated_at` integer NOT NULL
);
--> statement-breakpoint
CREATE UNIQUE INDEX `notify_threads_key_unique` ON `notify_threads` (`key`);--> statement-breakpoint
CREATE INDEX `notify_threads_open_idx` ON `notify_threads` (`resolved_at`,`site_id`);--> statement-breakpoint
CREATE TABLE `on_call_entries` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`site_id` integer NOT NULL,
	`contact_id` integer NOT NULL,
	`position` integer DEFAULT 0 NOT NULL,
	`weekdays` text NOT NULL,
	`start_time` text NOT NULL,
	`end_time` text NOT NULL,
	`created_at` integer NOT NULL,
	`updated_at` integer NOT NULL,
	FOREIGN KEY (`site_id`) REFERENCES `sites`(`id`) ON UPDATE no action ON DELETE cascade,
	FOREIGN KEY (`contact_id`) REFERENCES `contacts`(`id`) ON UPDATE no action ON DELETE cascade
);
--> statement-breakpoint
CREATE INDEX `on_call_entries_site_idx` ON `on_call_entries` (`site_id`,`position`);
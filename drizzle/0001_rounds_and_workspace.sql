CREATE TABLE `answers` (
	`room_id` text NOT NULL,
	`player_id` text NOT NULL,
	`prompt_index` integer NOT NULL,
	`written` text NOT NULL,
	`written_midi` integer NOT NULL,
	`string` integer NOT NULL,
	`fret` integer NOT NULL,
	`kind` text NOT NULL,
	`pitch_right` integer NOT NULL,
	`points` integer NOT NULL,
	`reaction_ms` integer NOT NULL,
	`streak` integer NOT NULL,
	`at` integer NOT NULL,
	PRIMARY KEY(`room_id`, `player_id`, `prompt_index`, `string`, `fret`),
	FOREIGN KEY (`room_id`) REFERENCES `rooms`(`id`) ON UPDATE no action ON DELETE cascade,
	FOREIGN KEY (`player_id`) REFERENCES `room_players`(`id`) ON UPDATE no action ON DELETE cascade
);
--> statement-breakpoint
CREATE INDEX `answers_room_prompt_idx` ON `answers` (`room_id`,`prompt_index`);--> statement-breakpoint
CREATE TABLE `api_tokens` (
	`id` text PRIMARY KEY NOT NULL,
	`user_id` text NOT NULL,
	`name` text NOT NULL,
	`token_hash` text NOT NULL,
	`last_used_at` integer,
	`revoked_at` integer,
	`created_at` integer DEFAULT (unixepoch('subsec') * 1000) NOT NULL,
	FOREIGN KEY (`user_id`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE cascade
);
--> statement-breakpoint
CREATE UNIQUE INDEX `api_tokens_hash_unique` ON `api_tokens` (`token_hash`);--> statement-breakpoint
CREATE INDEX `api_tokens_user_idx` ON `api_tokens` (`user_id`);--> statement-breakpoint
CREATE TABLE `invitations` (
	`token_hash` text PRIMARY KEY NOT NULL,
	`user_id` text NOT NULL,
	`class_id` text NOT NULL,
	`invited_by` text,
	`expires_at` integer NOT NULL,
	`accepted_at` integer,
	`revoked_at` integer,
	`created_at` integer DEFAULT (unixepoch('subsec') * 1000) NOT NULL,
	FOREIGN KEY (`user_id`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE cascade,
	FOREIGN KEY (`class_id`) REFERENCES `classes`(`id`) ON UPDATE no action ON DELETE cascade,
	FOREIGN KEY (`invited_by`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE set null
);
--> statement-breakpoint
CREATE INDEX `invitations_user_idx` ON `invitations` (`user_id`);--> statement-breakpoint
CREATE TABLE `reading_sets` (
	`id` text PRIMARY KEY NOT NULL,
	`org_id` text NOT NULL,
	`class_id` text,
	`name` text NOT NULL,
	`spec` text NOT NULL,
	`created_by` text,
	`created_at` integer DEFAULT (unixepoch('subsec') * 1000) NOT NULL,
	`updated_at` integer,
	FOREIGN KEY (`org_id`) REFERENCES `organisations`(`id`) ON UPDATE no action ON DELETE cascade,
	FOREIGN KEY (`class_id`) REFERENCES `classes`(`id`) ON UPDATE no action ON DELETE cascade,
	FOREIGN KEY (`created_by`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE set null
);
--> statement-breakpoint
CREATE INDEX `reading_sets_org_idx` ON `reading_sets` (`org_id`);--> statement-breakpoint
CREATE INDEX `reading_sets_class_idx` ON `reading_sets` (`class_id`);--> statement-breakpoint
CREATE TABLE `room_events` (
	`room_id` text NOT NULL,
	`seq` integer NOT NULL,
	`at` integer NOT NULL,
	`event` text NOT NULL,
	PRIMARY KEY(`room_id`, `seq`),
	FOREIGN KEY (`room_id`) REFERENCES `rooms`(`id`) ON UPDATE no action ON DELETE cascade
);
--> statement-breakpoint
CREATE TABLE `room_players` (
	`id` text PRIMARY KEY NOT NULL,
	`room_id` text NOT NULL,
	`user_id` text,
	`nickname` text NOT NULL,
	`created_at` integer DEFAULT (unixepoch('subsec') * 1000) NOT NULL,
	FOREIGN KEY (`room_id`) REFERENCES `rooms`(`id`) ON UPDATE no action ON DELETE cascade,
	FOREIGN KEY (`user_id`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE set null
);
--> statement-breakpoint
CREATE INDEX `room_players_room_idx` ON `room_players` (`room_id`);--> statement-breakpoint
CREATE INDEX `room_players_user_idx` ON `room_players` (`user_id`);--> statement-breakpoint
CREATE TABLE `rooms` (
	`id` text PRIMARY KEY NOT NULL,
	`code` text NOT NULL,
	`org_id` text NOT NULL,
	`host_user_id` text NOT NULL,
	`class_id` text,
	`reading_set_id` text,
	`tune_id` text,
	`title` text NOT NULL,
	`mode` text NOT NULL,
	`position` integer NOT NULL,
	`config` text NOT NULL,
	`ended_at` integer,
	`created_at` integer DEFAULT (unixepoch('subsec') * 1000) NOT NULL,
	FOREIGN KEY (`org_id`) REFERENCES `organisations`(`id`) ON UPDATE no action ON DELETE cascade,
	FOREIGN KEY (`host_user_id`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE cascade,
	FOREIGN KEY (`class_id`) REFERENCES `classes`(`id`) ON UPDATE no action ON DELETE set null,
	FOREIGN KEY (`reading_set_id`) REFERENCES `reading_sets`(`id`) ON UPDATE no action ON DELETE set null,
	FOREIGN KEY (`tune_id`) REFERENCES `tunes`(`id`) ON UPDATE no action ON DELETE set null
);
--> statement-breakpoint
CREATE UNIQUE INDEX `rooms_open_code_unique` ON `rooms` (`code`) WHERE ended_at IS NULL;--> statement-breakpoint
CREATE INDEX `rooms_host_idx` ON `rooms` (`host_user_id`);--> statement-breakpoint
CREATE INDEX `rooms_class_idx` ON `rooms` (`class_id`);--> statement-breakpoint
CREATE TABLE `spot_maps` (
	`class_id` text NOT NULL,
	`position` integer NOT NULL,
	`tuning` text NOT NULL,
	`map` text NOT NULL,
	`updated_by` text,
	`updated_at` integer NOT NULL,
	PRIMARY KEY(`class_id`, `position`, `tuning`),
	FOREIGN KEY (`class_id`) REFERENCES `classes`(`id`) ON UPDATE no action ON DELETE cascade,
	FOREIGN KEY (`updated_by`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE set null
);
--> statement-breakpoint
CREATE TABLE `tunes` (
	`id` text PRIMARY KEY NOT NULL,
	`org_id` text NOT NULL,
	`title` text NOT NULL,
	`composer` text DEFAULT '' NOT NULL,
	`key_fifths` integer NOT NULL,
	`beats_per_bar` integer NOT NULL,
	`notes` text NOT NULL,
	`created_by` text,
	`created_at` integer DEFAULT (unixepoch('subsec') * 1000) NOT NULL,
	FOREIGN KEY (`org_id`) REFERENCES `organisations`(`id`) ON UPDATE no action ON DELETE cascade,
	FOREIGN KEY (`created_by`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE set null
);
--> statement-breakpoint
CREATE INDEX `tunes_org_idx` ON `tunes` (`org_id`);
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
	`title` text NOT NULL,
	`mode` text NOT NULL,
	`position` integer NOT NULL,
	`config` text NOT NULL,
	`ended_at` integer,
	`created_at` integer DEFAULT (unixepoch('subsec') * 1000) NOT NULL,
	FOREIGN KEY (`org_id`) REFERENCES `organisations`(`id`) ON UPDATE no action ON DELETE cascade,
	FOREIGN KEY (`host_user_id`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE cascade,
	FOREIGN KEY (`class_id`) REFERENCES `classes`(`id`) ON UPDATE no action ON DELETE set null
);
--> statement-breakpoint
CREATE UNIQUE INDEX `rooms_open_code_unique` ON `rooms` (`code`) WHERE ended_at IS NULL;--> statement-breakpoint
CREATE INDEX `rooms_host_idx` ON `rooms` (`host_user_id`);--> statement-breakpoint
CREATE INDEX `rooms_class_idx` ON `rooms` (`class_id`);
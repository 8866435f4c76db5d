PRAGMA foreign_keys=OFF;--> statement-breakpoint
CREATE TABLE `__new_rooms` (
	`id` text PRIMARY KEY NOT NULL,
	`code` text NOT NULL,
	`org_id` text NOT NULL,
	`host_user_id` text NOT NULL,
	`class_id` text,
	`reading_set_id` text,
	`title` text NOT NULL,
	`mode` text NOT NULL,
	`position` integer NOT NULL,
	`config` text NOT NULL,
	`setup` text,
	`source_name` text,
	`ended_at` integer,
	`created_at` integer DEFAULT (unixepoch('subsec') * 1000) NOT NULL,
	FOREIGN KEY (`org_id`) REFERENCES `organisations`(`id`) ON UPDATE no action ON DELETE cascade,
	FOREIGN KEY (`host_user_id`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE cascade,
	FOREIGN KEY (`class_id`) REFERENCES `classes`(`id`) ON UPDATE no action ON DELETE set null,
	FOREIGN KEY (`reading_set_id`) REFERENCES `reading_sets`(`id`) ON UPDATE no action ON DELETE set null
);
--> statement-breakpoint
INSERT INTO `__new_rooms`("id", "code", "org_id", "host_user_id", "class_id", "reading_set_id", "title", "mode", "position", "config", "setup", "source_name", "ended_at", "created_at") SELECT "id", "code", "org_id", "host_user_id", "class_id", "reading_set_id", "title", "mode", "position", json_remove("config", '$.setup', '$.sourceName'), json_extract("config", '$.setup'), json_extract("config", '$.sourceName'), "ended_at", "created_at" FROM `rooms`;--> statement-breakpoint
DROP TABLE `rooms`;--> statement-breakpoint
ALTER TABLE `__new_rooms` RENAME TO `rooms`;--> statement-breakpoint
PRAGMA foreign_keys=ON;--> statement-breakpoint
CREATE UNIQUE INDEX `rooms_open_code_unique` ON `rooms` (`code`) WHERE ended_at IS NULL;--> statement-breakpoint
CREATE INDEX `rooms_host_idx` ON `rooms` (`host_user_id`);--> statement-breakpoint
CREATE INDEX `rooms_class_idx` ON `rooms` (`class_id`);--> statement-breakpoint
ALTER TABLE `answers` ADD `verdict` text;
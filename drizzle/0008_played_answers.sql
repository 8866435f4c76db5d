PRAGMA foreign_keys=OFF;--> statement-breakpoint
CREATE TABLE `__new_practice_answers` (
	`user_id` text NOT NULL,
	`client_id` text NOT NULL,
	`assignment_id` text,
	`source` text NOT NULL,
	`position` integer NOT NULL,
	`tuning` text NOT NULL,
	`written` text NOT NULL,
	`written_midi` integer NOT NULL,
	`input` text DEFAULT 'tap' NOT NULL,
	`string` integer,
	`fret` integer,
	`heard_midi` integer,
	`heard_cents` integer,
	`kind` text NOT NULL,
	`pitch_right` integer NOT NULL,
	`reaction_ms` integer NOT NULL,
	`at` integer NOT NULL,
	PRIMARY KEY(`user_id`, `client_id`),
	FOREIGN KEY (`user_id`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE cascade,
	FOREIGN KEY (`assignment_id`) REFERENCES `assignments`(`id`) ON UPDATE no action ON DELETE set null
);
--> statement-breakpoint
INSERT INTO `__new_practice_answers`("user_id", "client_id", "assignment_id", "source", "position", "tuning", "written", "written_midi", "string", "fret", "kind", "pitch_right", "reaction_ms", "at") SELECT "user_id", "client_id", "assignment_id", "source", "position", "tuning", "written", "written_midi", "string", "fret", "kind", "pitch_right", "reaction_ms", "at" FROM `practice_answers`;--> statement-breakpoint
DROP TABLE `practice_answers`;--> statement-breakpoint
ALTER TABLE `__new_practice_answers` RENAME TO `practice_answers`;--> statement-breakpoint
PRAGMA foreign_keys=ON;--> statement-breakpoint
CREATE INDEX `practice_user_at_idx` ON `practice_answers` (`user_id`,`at`);--> statement-breakpoint
ALTER TABLE `assignments` ADD `played_only` integer DEFAULT false NOT NULL;--> statement-breakpoint
ALTER TABLE `rhythm_attempts` ADD `input` text DEFAULT 'tap' NOT NULL;
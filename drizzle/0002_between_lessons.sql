CREATE TABLE `assignment_targets` (
	`assignment_id` text NOT NULL,
	`user_id` text NOT NULL,
	PRIMARY KEY(`assignment_id`, `user_id`),
	FOREIGN KEY (`assignment_id`) REFERENCES `assignments`(`id`) ON UPDATE no action ON DELETE cascade,
	FOREIGN KEY (`user_id`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE cascade
);
--> statement-breakpoint
CREATE TABLE `assignments` (
	`id` text PRIMARY KEY NOT NULL,
	`org_id` text NOT NULL,
	`class_id` text NOT NULL,
	`title` text NOT NULL,
	`reading_set_id` text,
	`preset_id` text,
	`tune_id` text,
	`goal_notes` integer NOT NULL,
	`goal_accuracy_pct` integer NOT NULL,
	`goal_median_ms` integer,
	`due_at` integer NOT NULL,
	`created_by` text,
	`reminded_at` integer,
	`created_at` integer DEFAULT (unixepoch('subsec') * 1000) NOT NULL,
	FOREIGN KEY (`org_id`) REFERENCES `organisations`(`id`) ON UPDATE no action ON DELETE cascade,
	FOREIGN KEY (`class_id`) REFERENCES `classes`(`id`) ON UPDATE no action ON DELETE cascade,
	FOREIGN KEY (`reading_set_id`) REFERENCES `reading_sets`(`id`) ON UPDATE no action ON DELETE set null,
	FOREIGN KEY (`created_by`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE set null
);
--> statement-breakpoint
CREATE INDEX `assignments_class_idx` ON `assignments` (`class_id`);--> statement-breakpoint
CREATE TABLE `mail_log` (
	`kind` text NOT NULL,
	`subject_id` text NOT NULL,
	`user_id` text NOT NULL,
	`sent_at` integer NOT NULL,
	PRIMARY KEY(`kind`, `subject_id`, `user_id`),
	FOREIGN KEY (`user_id`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE cascade
);
--> statement-breakpoint
CREATE TABLE `practice_answers` (
	`user_id` text NOT NULL,
	`client_id` text NOT NULL,
	`assignment_id` text,
	`source` text NOT NULL,
	`position` integer NOT NULL,
	`tuning` text NOT NULL,
	`written` text NOT NULL,
	`written_midi` integer NOT NULL,
	`string` integer NOT NULL,
	`fret` integer NOT NULL,
	`kind` text NOT NULL,
	`pitch_right` integer NOT NULL,
	`reaction_ms` integer NOT NULL,
	`at` integer NOT NULL,
	PRIMARY KEY(`user_id`, `client_id`),
	FOREIGN KEY (`user_id`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE cascade,
	FOREIGN KEY (`assignment_id`) REFERENCES `assignments`(`id`) ON UPDATE no action ON DELETE set null
);
--> statement-breakpoint
CREATE INDEX `practice_user_at_idx` ON `practice_answers` (`user_id`,`at`);--> statement-breakpoint
CREATE TABLE `rhythm_attempts` (
	`id` text PRIMARY KEY NOT NULL,
	`user_id` text NOT NULL,
	`tune_id` text NOT NULL,
	`tempo` integer NOT NULL,
	`score_pct` integer NOT NULL,
	`results` text NOT NULL,
	`at` integer NOT NULL,
	FOREIGN KEY (`user_id`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE cascade
);
--> statement-breakpoint
CREATE INDEX `rhythm_user_idx` ON `rhythm_attempts` (`user_id`);
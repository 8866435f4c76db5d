CREATE TABLE `sign_in_cards` (
	`id` text PRIMARY KEY NOT NULL,
	`user_id` text NOT NULL,
	`token_hash` text NOT NULL,
	`code_hash` text NOT NULL,
	`issued_by` text,
	`created_at` integer DEFAULT (unixepoch('subsec') * 1000) NOT NULL,
	FOREIGN KEY (`user_id`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE cascade,
	FOREIGN KEY (`issued_by`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE set null
);
--> statement-breakpoint
CREATE UNIQUE INDEX `sign_in_cards_user_unique` ON `sign_in_cards` (`user_id`);--> statement-breakpoint
CREATE UNIQUE INDEX `sign_in_cards_token_unique` ON `sign_in_cards` (`token_hash`);--> statement-breakpoint
CREATE UNIQUE INDEX `sign_in_cards_code_unique` ON `sign_in_cards` (`code_hash`);--> statement-breakpoint
ALTER TABLE `sessions` ADD `card_id` text REFERENCES sign_in_cards(id) ON DELETE cascade;
ALTER TABLE `tunes` ADD `score` text;--> statement-breakpoint
ALTER TABLE `tunes` ADD `source` blob;
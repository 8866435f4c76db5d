CREATE TABLE `room_fence_checks` (
	`room_id` text NOT NULL,
	`fence` integer NOT NULL
);
--> statement-breakpoint
CREATE TABLE `room_leases` (
	`room_id` text PRIMARY KEY NOT NULL,
	`fence` integer NOT NULL,
	`node_id` text NOT NULL,
	`taken_at` integer NOT NULL,
	FOREIGN KEY (`room_id`) REFERENCES `rooms`(`id`) ON UPDATE no action ON DELETE cascade
);


--> statement-breakpoint
-- The fence check (app/db/schema.ts, roomFenceChecks): a row whose fence is the room's is skipped
-- (nothing stored), any other aborts with an error that names the cause.
CREATE TRIGGER `room_fence_check` BEFORE INSERT ON `room_fence_checks`
BEGIN
	SELECT RAISE(ABORT, 'fenced: another node has taken this room')
		WHERE NOT EXISTS (SELECT 1 FROM `room_leases` WHERE `room_id` = NEW.`room_id` AND `fence` = NEW.`fence`);
	SELECT RAISE(IGNORE);
END;

ALTER TABLE `runs` ADD `heartbeat_at` datetime(3);--> statement-breakpoint
ALTER TABLE `runs` ADD `partial` boolean DEFAULT false NOT NULL;
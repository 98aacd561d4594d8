CREATE TABLE `saved_search_announcements` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`saved_search_id` bigint unsigned NOT NULL,
	`build_id` bigint unsigned NOT NULL,
	`mailed` boolean NOT NULL,
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `saved_search_announcements_id` PRIMARY KEY(`id`),
	CONSTRAINT `saved_search_announcements_unique` UNIQUE(`saved_search_id`,`build_id`)
);
--> statement-breakpoint
CREATE TABLE `saved_searches` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`user_id` bigint unsigned NOT NULL,
	`name` varchar(80) NOT NULL,
	`query` json NOT NULL,
	`email_on` boolean NOT NULL DEFAULT true,
	`last_notified_at` datetime(3),
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	`updated_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `saved_searches_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
ALTER TABLE `saved_search_announcements` ADD CONSTRAINT `saved_search_announcements_saved_search_id_saved_searches_id_fk` FOREIGN KEY (`saved_search_id`) REFERENCES `saved_searches`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `saved_search_announcements` ADD CONSTRAINT `saved_search_announcements_build_id_builds_id_fk` FOREIGN KEY (`build_id`) REFERENCES `builds`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `saved_searches` ADD CONSTRAINT `saved_searches_user_id_users_id_fk` FOREIGN KEY (`user_id`) REFERENCES `users`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
CREATE INDEX `saved_search_announcements_build_idx` ON `saved_search_announcements` (`build_id`);--> statement-breakpoint
CREATE INDEX `saved_searches_user_idx` ON `saved_searches` (`user_id`,`id`);
CREATE TABLE `notification_settings` (
	`user_id` bigint unsigned NOT NULL,
	`read_up_to_event_id` bigint unsigned NOT NULL DEFAULT 0,
	`email_off` json NOT NULL,
	`updated_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `notification_settings_user_id` PRIMARY KEY(`user_id`)
);
--> statement-breakpoint
ALTER TABLE `notification_settings` ADD CONSTRAINT `notification_settings_user_id_users_id_fk` FOREIGN KEY (`user_id`) REFERENCES `users`(`id`) ON DELETE cascade ON UPDATE no action;
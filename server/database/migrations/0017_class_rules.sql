CREATE TABLE `class_rules` (
	`user_id` bigint unsigned NOT NULL,
	`rules` json NOT NULL,
	`updated_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `class_rules_user_id` PRIMARY KEY(`user_id`)
);
--> statement-breakpoint
ALTER TABLE `class_rules` ADD CONSTRAINT `class_rules_user_id_users_id_fk` FOREIGN KEY (`user_id`) REFERENCES `users`(`id`) ON DELETE cascade ON UPDATE no action;
CREATE TABLE `review_edits` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`review_id` bigint unsigned NOT NULL,
	`rating` int unsigned NOT NULL,
	`aspects` json NOT NULL,
	`body` text NOT NULL,
	`show_delivery_pull` boolean NOT NULL,
	`written_at` datetime(3) NOT NULL,
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `review_edits_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
CREATE TABLE `reviews` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`order_id` bigint unsigned NOT NULL,
	`builder_id` bigint unsigned NOT NULL,
	`build_id` bigint unsigned,
	`author_id` bigint unsigned NOT NULL,
	`rating` int unsigned NOT NULL,
	`aspects` json NOT NULL,
	`body` text NOT NULL,
	`show_delivery_pull` boolean NOT NULL DEFAULT false,
	`answer` text,
	`answered_at` datetime(3),
	`hidden_at` datetime(3),
	`hidden_reason` text,
	`hidden_by` bigint unsigned,
	`edited_at` datetime(3),
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `reviews_id` PRIMARY KEY(`id`),
	CONSTRAINT `reviews_order_unique` UNIQUE(`order_id`),
	CONSTRAINT `reviews_rating_range` CHECK(`reviews`.`rating` between 1 and 5)
);
--> statement-breakpoint
ALTER TABLE `review_edits` ADD CONSTRAINT `review_edits_review_id_reviews_id_fk` FOREIGN KEY (`review_id`) REFERENCES `reviews`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `reviews` ADD CONSTRAINT `reviews_order_id_orders_id_fk` FOREIGN KEY (`order_id`) REFERENCES `orders`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `reviews` ADD CONSTRAINT `reviews_builder_id_builder_profiles_id_fk` FOREIGN KEY (`builder_id`) REFERENCES `builder_profiles`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `reviews` ADD CONSTRAINT `reviews_build_id_builds_id_fk` FOREIGN KEY (`build_id`) REFERENCES `builds`(`id`) ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `reviews` ADD CONSTRAINT `reviews_author_id_users_id_fk` FOREIGN KEY (`author_id`) REFERENCES `users`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `reviews` ADD CONSTRAINT `reviews_hidden_by_users_id_fk` FOREIGN KEY (`hidden_by`) REFERENCES `users`(`id`) ON DELETE set null ON UPDATE no action;--> statement-breakpoint
CREATE INDEX `review_edits_review_idx` ON `review_edits` (`review_id`,`id`);--> statement-breakpoint
CREATE INDEX `reviews_builder_idx` ON `reviews` (`builder_id`,`created_at`);--> statement-breakpoint
CREATE INDEX `reviews_build_idx` ON `reviews` (`build_id`);
CREATE TABLE `change_orders` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`order_id` bigint unsigned NOT NULL,
	`status` enum('open','accepted','declined') NOT NULL DEFAULT 'open',
	`total_cents` bigint unsigned NOT NULL,
	`milestones` json NOT NULL,
	`line_items` json NOT NULL,
	`notes` text NOT NULL,
	`decline_reason` text,
	`created_by` bigint unsigned NOT NULL,
	`answered_at` datetime(3),
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `change_orders_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
ALTER TABLE `change_orders` ADD CONSTRAINT `change_orders_order_id_orders_id_fk` FOREIGN KEY (`order_id`) REFERENCES `orders`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `change_orders` ADD CONSTRAINT `change_orders_created_by_users_id_fk` FOREIGN KEY (`created_by`) REFERENCES `users`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
CREATE INDEX `change_orders_order_idx` ON `change_orders` (`order_id`,`status`);
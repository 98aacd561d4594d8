CREATE TABLE `deal_events` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`request_id` bigint unsigned NOT NULL,
	`order_id` bigint unsigned,
	`milestone_id` bigint unsigned,
	`actor_id` bigint unsigned,
	`action` varchar(60) NOT NULL,
	`detail` varchar(500) NOT NULL DEFAULT '',
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `deal_events_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
CREATE TABLE `delivery_pulls` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`milestone_id` bigint unsigned NOT NULL,
	`file_id` bigint unsigned NOT NULL,
	`declared_standard` varchar(20) NOT NULL,
	`baro_in_hg` decimal(5,2),
	`air_temp_f` decimal(5,1),
	`humidity_pct` decimal(4,1),
	`bore_in` decimal(7,4) NOT NULL,
	`stroke_in` decimal(7,4) NOT NULL,
	`cylinders` int NOT NULL,
	`report` json NOT NULL,
	`status` enum('verified','rejected') NOT NULL,
	`meets_target` boolean NOT NULL,
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `delivery_pulls_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
CREATE TABLE `mail_outbox` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`dedupe_key` varchar(191),
	`to_address` varchar(254) NOT NULL,
	`subject` varchar(200) NOT NULL,
	`text` text NOT NULL,
	`html` text NOT NULL,
	`attempts` int unsigned NOT NULL DEFAULT 0,
	`next_attempt_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	`sent_at` datetime(3),
	`last_error` varchar(1000),
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `mail_outbox_id` PRIMARY KEY(`id`),
	CONSTRAINT `mail_outbox_dedupe_unique` UNIQUE(`dedupe_key`)
);
--> statement-breakpoint
CREATE TABLE `message_reads` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`request_id` bigint unsigned NOT NULL,
	`user_id` bigint unsigned NOT NULL,
	`last_read_message_id` bigint unsigned NOT NULL DEFAULT 0,
	`last_seen_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `message_reads_id` PRIMARY KEY(`id`),
	CONSTRAINT `message_reads_unique` UNIQUE(`request_id`,`user_id`)
);
--> statement-breakpoint
CREATE TABLE `milestone_proofs` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`milestone_id` bigint unsigned NOT NULL,
	`file_id` bigint unsigned NOT NULL,
	CONSTRAINT `milestone_proofs_id` PRIMARY KEY(`id`),
	CONSTRAINT `milestone_proofs_file_unique` UNIQUE(`file_id`)
);
--> statement-breakpoint
CREATE TABLE `milestones` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`order_id` bigint unsigned NOT NULL,
	`position` int unsigned NOT NULL,
	`title` varchar(120) NOT NULL,
	`deliverable` text NOT NULL,
	`amount_cents` bigint unsigned NOT NULL,
	`fee_cents` bigint unsigned NOT NULL,
	`due_date` date NOT NULL,
	`guaranteed` boolean NOT NULL DEFAULT false,
	`state` enum('awaiting_payment','funded','submitted','approved','released','disputed','refunded','cancelled') NOT NULL DEFAULT 'awaiting_payment',
	`checkout_attempt` int unsigned NOT NULL DEFAULT 0,
	`submission_notes` text,
	`delivery_pull_id` bigint unsigned,
	`dispute_reason` text,
	`auto_approved` boolean NOT NULL DEFAULT false,
	`funded_at` datetime(3),
	`submitted_at` datetime(3),
	`approved_at` datetime(3),
	`released_at` datetime(3),
	`disputed_at` datetime(3),
	`refunded_at` datetime(3),
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	`updated_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `milestones_id` PRIMARY KEY(`id`),
	CONSTRAINT `milestones_position_unique` UNIQUE(`order_id`,`position`)
);
--> statement-breakpoint
CREATE TABLE `orders` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`request_id` bigint unsigned NOT NULL,
	`quote_id` bigint unsigned NOT NULL,
	`revision_id` bigint unsigned NOT NULL,
	`racer_id` bigint unsigned NOT NULL,
	`builder_id` bigint unsigned NOT NULL,
	`total_cents` bigint unsigned NOT NULL,
	`platform_fee_cents` bigint unsigned NOT NULL,
	`currency` char(3) NOT NULL DEFAULT 'usd',
	`status` enum('active','completed','cancelled') NOT NULL DEFAULT 'active',
	`cancelled_at` datetime(3),
	`cancelled_by` bigint unsigned,
	`completed_at` datetime(3),
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	`updated_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `orders_id` PRIMARY KEY(`id`),
	CONSTRAINT `orders_request_unique` UNIQUE(`request_id`)
);
--> statement-breakpoint
CREATE TABLE `payments` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`milestone_id` bigint unsigned NOT NULL,
	`kind` enum('checkout','refund','transfer') NOT NULL,
	`status` enum('open','succeeded','failed','expired') NOT NULL,
	`amount_cents` bigint unsigned NOT NULL,
	`currency` char(3) NOT NULL DEFAULT 'usd',
	`attempt` int unsigned NOT NULL DEFAULT 0,
	`stripe_checkout_session_id` varchar(255),
	`stripe_payment_intent_id` varchar(255),
	`stripe_charge_id` varchar(255),
	`stripe_refund_id` varchar(255),
	`stripe_transfer_id` varchar(255),
	`checkout_url` varchar(1000),
	`failure_message` varchar(500),
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	`updated_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `payments_id` PRIMARY KEY(`id`),
	CONSTRAINT `payments_checkout_unique` UNIQUE(`stripe_checkout_session_id`),
	CONSTRAINT `payments_refund_unique` UNIQUE(`stripe_refund_id`),
	CONSTRAINT `payments_transfer_unique` UNIQUE(`stripe_transfer_id`)
);
--> statement-breakpoint
CREATE TABLE `payout_accounts` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`builder_id` bigint unsigned NOT NULL,
	`stripe_account_id` varchar(255) NOT NULL,
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `payout_accounts_id` PRIMARY KEY(`id`),
	CONSTRAINT `payout_accounts_builder_unique` UNIQUE(`builder_id`),
	CONSTRAINT `payout_accounts_stripe_unique` UNIQUE(`stripe_account_id`)
);
--> statement-breakpoint
CREATE TABLE `quote_line_items` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`revision_id` bigint unsigned NOT NULL,
	`position` int unsigned NOT NULL,
	`category` varchar(60) NOT NULL,
	`description` varchar(200) NOT NULL,
	`part_number` varchar(80) NOT NULL DEFAULT '',
	`quantity` int unsigned NOT NULL,
	`unit_price_cents` bigint unsigned NOT NULL,
	CONSTRAINT `quote_line_items_id` PRIMARY KEY(`id`),
	CONSTRAINT `quote_line_items_position_unique` UNIQUE(`revision_id`,`position`)
);
--> statement-breakpoint
CREATE TABLE `quote_milestones` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`revision_id` bigint unsigned NOT NULL,
	`position` int unsigned NOT NULL,
	`title` varchar(120) NOT NULL,
	`deliverable` text NOT NULL,
	`amount_cents` bigint unsigned NOT NULL,
	`due_date` date NOT NULL,
	CONSTRAINT `quote_milestones_id` PRIMARY KEY(`id`),
	CONSTRAINT `quote_milestones_position_unique` UNIQUE(`revision_id`,`position`)
);
--> statement-breakpoint
CREATE TABLE `quote_requests` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`racer_id` bigint unsigned NOT NULL,
	`builder_id` bigint unsigned NOT NULL,
	`build_id` bigint unsigned,
	`title` varchar(160) NOT NULL,
	`target_hp` decimal(8,1) NOT NULL,
	`target_tq` decimal(8,1),
	`target_standard` varchar(20) NOT NULL,
	`displacement_cap_ci` decimal(6,1),
	`fuel` enum('pump_gas','race_gas','e85','methanol') NOT NULL,
	`aspiration` enum('na','turbo','supercharged','nitrous') NOT NULL,
	`intended_use` enum('drag','road_course','street_strip','off_road','marine','street') NOT NULL,
	`transmission` enum('manual','automatic','sequential','none') NOT NULL,
	`stall_rpm` int unsigned,
	`shift_rpm` int unsigned,
	`budget_min_cents` bigint unsigned NOT NULL,
	`budget_max_cents` bigint unsigned NOT NULL,
	`deadline` date,
	`notes` text NOT NULL,
	`status` enum('open','quoted','accepted','declined','withdrawn') NOT NULL DEFAULT 'open',
	`last_message_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	`updated_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `quote_requests_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
CREATE TABLE `quote_revisions` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`quote_id` bigint unsigned NOT NULL,
	`revision` int unsigned NOT NULL,
	`total_cents` bigint unsigned NOT NULL,
	`platform_fee_bp` int unsigned NOT NULL,
	`platform_fee_cents` bigint unsigned NOT NULL,
	`valid_until` date NOT NULL,
	`notes` text NOT NULL,
	`guarantee_hp` decimal(8,1),
	`guarantee_tolerance_pct` decimal(4,1),
	`guarantee_standard` varchar(20),
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `quote_revisions_id` PRIMARY KEY(`id`),
	CONSTRAINT `quote_revisions_unique` UNIQUE(`quote_id`,`revision`)
);
--> statement-breakpoint
CREATE TABLE `quotes` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`request_id` bigint unsigned NOT NULL,
	`builder_id` bigint unsigned NOT NULL,
	`status` enum('sent','accepted','declined','withdrawn') NOT NULL DEFAULT 'sent',
	`current_revision` int unsigned NOT NULL DEFAULT 1,
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	`updated_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `quotes_id` PRIMARY KEY(`id`),
	CONSTRAINT `quotes_request_unique` UNIQUE(`request_id`)
);
--> statement-breakpoint
CREATE TABLE `request_attachments` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`request_id` bigint unsigned NOT NULL,
	`message_id` bigint unsigned,
	`file_id` bigint unsigned NOT NULL,
	CONSTRAINT `request_attachments_id` PRIMARY KEY(`id`),
	CONSTRAINT `request_attachments_file_unique` UNIQUE(`file_id`)
);
--> statement-breakpoint
CREATE TABLE `request_messages` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`request_id` bigint unsigned NOT NULL,
	`sender_id` bigint unsigned,
	`kind` enum('message','event') NOT NULL DEFAULT 'message',
	`body` text NOT NULL,
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `request_messages_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
CREATE TABLE `stripe_events` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`event_id` varchar(255) NOT NULL,
	`type` varchar(100) NOT NULL,
	`outcome` varchar(500) NOT NULL,
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `stripe_events_id` PRIMARY KEY(`id`),
	CONSTRAINT `stripe_events_event_unique` UNIQUE(`event_id`)
);
--> statement-breakpoint
ALTER TABLE `deal_events` ADD CONSTRAINT `deal_events_request_id_quote_requests_id_fk` FOREIGN KEY (`request_id`) REFERENCES `quote_requests`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `deal_events` ADD CONSTRAINT `deal_events_order_id_orders_id_fk` FOREIGN KEY (`order_id`) REFERENCES `orders`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `deal_events` ADD CONSTRAINT `deal_events_milestone_id_milestones_id_fk` FOREIGN KEY (`milestone_id`) REFERENCES `milestones`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `deal_events` ADD CONSTRAINT `deal_events_actor_id_users_id_fk` FOREIGN KEY (`actor_id`) REFERENCES `users`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `delivery_pulls` ADD CONSTRAINT `delivery_pulls_milestone_id_milestones_id_fk` FOREIGN KEY (`milestone_id`) REFERENCES `milestones`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `delivery_pulls` ADD CONSTRAINT `delivery_pulls_file_id_files_id_fk` FOREIGN KEY (`file_id`) REFERENCES `files`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `message_reads` ADD CONSTRAINT `message_reads_request_id_quote_requests_id_fk` FOREIGN KEY (`request_id`) REFERENCES `quote_requests`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `message_reads` ADD CONSTRAINT `message_reads_user_id_users_id_fk` FOREIGN KEY (`user_id`) REFERENCES `users`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `milestone_proofs` ADD CONSTRAINT `milestone_proofs_milestone_id_milestones_id_fk` FOREIGN KEY (`milestone_id`) REFERENCES `milestones`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `milestone_proofs` ADD CONSTRAINT `milestone_proofs_file_id_files_id_fk` FOREIGN KEY (`file_id`) REFERENCES `files`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `milestones` ADD CONSTRAINT `milestones_order_id_orders_id_fk` FOREIGN KEY (`order_id`) REFERENCES `orders`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `orders` ADD CONSTRAINT `orders_request_id_quote_requests_id_fk` FOREIGN KEY (`request_id`) REFERENCES `quote_requests`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `orders` ADD CONSTRAINT `orders_quote_id_quotes_id_fk` FOREIGN KEY (`quote_id`) REFERENCES `quotes`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `orders` ADD CONSTRAINT `orders_revision_id_quote_revisions_id_fk` FOREIGN KEY (`revision_id`) REFERENCES `quote_revisions`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `orders` ADD CONSTRAINT `orders_racer_id_users_id_fk` FOREIGN KEY (`racer_id`) REFERENCES `users`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `orders` ADD CONSTRAINT `orders_builder_id_builder_profiles_id_fk` FOREIGN KEY (`builder_id`) REFERENCES `builder_profiles`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `orders` ADD CONSTRAINT `orders_cancelled_by_users_id_fk` FOREIGN KEY (`cancelled_by`) REFERENCES `users`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `payments` ADD CONSTRAINT `payments_milestone_id_milestones_id_fk` FOREIGN KEY (`milestone_id`) REFERENCES `milestones`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `payout_accounts` ADD CONSTRAINT `payout_accounts_builder_id_builder_profiles_id_fk` FOREIGN KEY (`builder_id`) REFERENCES `builder_profiles`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `quote_line_items` ADD CONSTRAINT `quote_line_items_revision_id_quote_revisions_id_fk` FOREIGN KEY (`revision_id`) REFERENCES `quote_revisions`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `quote_milestones` ADD CONSTRAINT `quote_milestones_revision_id_quote_revisions_id_fk` FOREIGN KEY (`revision_id`) REFERENCES `quote_revisions`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `quote_requests` ADD CONSTRAINT `quote_requests_racer_id_users_id_fk` FOREIGN KEY (`racer_id`) REFERENCES `users`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `quote_requests` ADD CONSTRAINT `quote_requests_builder_id_builder_profiles_id_fk` FOREIGN KEY (`builder_id`) REFERENCES `builder_profiles`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `quote_requests` ADD CONSTRAINT `quote_requests_build_id_builds_id_fk` FOREIGN KEY (`build_id`) REFERENCES `builds`(`id`) ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `quote_revisions` ADD CONSTRAINT `quote_revisions_quote_id_quotes_id_fk` FOREIGN KEY (`quote_id`) REFERENCES `quotes`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `quotes` ADD CONSTRAINT `quotes_request_id_quote_requests_id_fk` FOREIGN KEY (`request_id`) REFERENCES `quote_requests`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `quotes` ADD CONSTRAINT `quotes_builder_id_builder_profiles_id_fk` FOREIGN KEY (`builder_id`) REFERENCES `builder_profiles`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `request_attachments` ADD CONSTRAINT `request_attachments_request_id_quote_requests_id_fk` FOREIGN KEY (`request_id`) REFERENCES `quote_requests`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `request_attachments` ADD CONSTRAINT `request_attachments_message_id_request_messages_id_fk` FOREIGN KEY (`message_id`) REFERENCES `request_messages`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `request_attachments` ADD CONSTRAINT `request_attachments_file_id_files_id_fk` FOREIGN KEY (`file_id`) REFERENCES `files`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `request_messages` ADD CONSTRAINT `request_messages_request_id_quote_requests_id_fk` FOREIGN KEY (`request_id`) REFERENCES `quote_requests`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `request_messages` ADD CONSTRAINT `request_messages_sender_id_users_id_fk` FOREIGN KEY (`sender_id`) REFERENCES `users`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
CREATE INDEX `deal_events_request_idx` ON `deal_events` (`request_id`,`id`);--> statement-breakpoint
CREATE INDEX `delivery_pulls_milestone_idx` ON `delivery_pulls` (`milestone_id`);--> statement-breakpoint
CREATE INDEX `mail_outbox_due_idx` ON `mail_outbox` (`sent_at`,`next_attempt_at`);--> statement-breakpoint
CREATE INDEX `milestones_state_idx` ON `milestones` (`state`,`submitted_at`);--> statement-breakpoint
CREATE INDEX `orders_racer_idx` ON `orders` (`racer_id`);--> statement-breakpoint
CREATE INDEX `orders_builder_idx` ON `orders` (`builder_id`);--> statement-breakpoint
CREATE INDEX `payments_milestone_idx` ON `payments` (`milestone_id`,`kind`);--> statement-breakpoint
CREATE INDEX `payments_intent_idx` ON `payments` (`stripe_payment_intent_id`);--> statement-breakpoint
CREATE INDEX `quote_requests_racer_idx` ON `quote_requests` (`racer_id`,`last_message_at`);--> statement-breakpoint
CREATE INDEX `quote_requests_builder_idx` ON `quote_requests` (`builder_id`,`last_message_at`);--> statement-breakpoint
CREATE INDEX `request_attachments_request_idx` ON `request_attachments` (`request_id`);--> statement-breakpoint
CREATE INDEX `request_messages_thread_idx` ON `request_messages` (`request_id`,`id`);
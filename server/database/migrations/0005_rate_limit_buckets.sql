CREATE TABLE `rate_limit_buckets` (
	`bucket_key` varchar(320) NOT NULL,
	`tokens` double NOT NULL,
	`updated_at` datetime(3) NOT NULL,
	CONSTRAINT `rate_limit_buckets_bucket_key` PRIMARY KEY(`bucket_key`)
);
--> statement-breakpoint
CREATE INDEX `rate_limit_buckets_updated_idx` ON `rate_limit_buckets` (`updated_at`);
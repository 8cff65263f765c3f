CREATE TABLE `admin_audit` (
	`id` bigint AUTO_INCREMENT NOT NULL,
	`actor_id` int,
	`actor_email` varchar(254) NOT NULL,
	`action` varchar(60) NOT NULL,
	`target_type` varchar(40) NOT NULL,
	`target_id` varchar(64) NOT NULL,
	`before` json,
	`after` json,
	`at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `admin_audit_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
CREATE TABLE `sign_in_failures` (
	`id` bigint AUTO_INCREMENT NOT NULL,
	`email` varchar(254) NOT NULL,
	`client_address` varchar(64) NOT NULL,
	`at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `sign_in_failures_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
CREATE TABLE `users` (
	`id` int AUTO_INCREMENT NOT NULL,
	`email` varchar(254) NOT NULL,
	`name` varchar(120) NOT NULL,
	`role` enum('viewer','analyst','validator','admin') NOT NULL,
	`password_hash` varchar(100) NOT NULL,
	`active` boolean NOT NULL DEFAULT true,
	`must_change_password` boolean NOT NULL DEFAULT false,
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	`updated_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `users_id` PRIMARY KEY(`id`),
	CONSTRAINT `users_email_uq` UNIQUE(`email`)
);
--> statement-breakpoint
CREATE TABLE `worker_heartbeats` (
	`worker_id` varchar(80) NOT NULL,
	`host` varchar(120) NOT NULL,
	`pid` int NOT NULL,
	`started_at` datetime(3) NOT NULL,
	`last_beat_at` datetime(3) NOT NULL,
	`stopped_at` datetime(3),
	CONSTRAINT `worker_heartbeats_worker_id` PRIMARY KEY(`worker_id`)
);
--> statement-breakpoint
CREATE INDEX `admin_audit_target_idx` ON `admin_audit` (`target_type`,`target_id`);--> statement-breakpoint
CREATE INDEX `sign_in_failures_email_idx` ON `sign_in_failures` (`email`,`at`);--> statement-breakpoint
CREATE INDEX `sign_in_failures_addr_idx` ON `sign_in_failures` (`client_address`,`at`);
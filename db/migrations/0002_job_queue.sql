CREATE TABLE `jobs` (
	`id` bigint AUTO_INCREMENT NOT NULL,
	`kind` varchar(40) NOT NULL,
	`payload` json NOT NULL,
	`status` enum('queued','running','succeeded','failed','cancelled') NOT NULL DEFAULT 'queued',
	`progress` int NOT NULL DEFAULT 0,
	`message` varchar(300),
	`attempts` int NOT NULL DEFAULT 0,
	`max_attempts` int NOT NULL DEFAULT 3,
	`lease_expires_at` datetime(3),
	`worker_id` varchar(80),
	`error` text,
	`cancel_requested` boolean NOT NULL DEFAULT false,
	`result` json,
	`created_by` int,
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	`started_at` datetime(3),
	`finished_at` datetime(3),
	`updated_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `jobs_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
CREATE INDEX `jobs_claim_idx` ON `jobs` (`status`,`kind`,`id`);--> statement-breakpoint
CREATE INDEX `jobs_lease_idx` ON `jobs` (`status`,`lease_expires_at`);
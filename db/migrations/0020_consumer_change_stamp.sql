CREATE TABLE `consumer_change_epoch` (
	`id` int NOT NULL,
	`epoch` varchar(36) NOT NULL,
	`pruned` bigint unsigned NOT NULL DEFAULT 0,
	CONSTRAINT `consumer_change_epoch_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
CREATE TABLE `consumer_changes` (
	`connection_id` bigint unsigned NOT NULL,
	`n` bigint unsigned NOT NULL,
	`at` datetime(6) NOT NULL,
	CONSTRAINT `consumer_changes_connection_id` PRIMARY KEY(`connection_id`)
);

-- The change stamp of the consumer API's answers (lib/dal/change-stamp.ts): every row written to a table
-- an in-force answer is read from adds one to its connection's count, in the writer's own transaction
-- (one row per connection: concurrent writers never wait on one another). cohort_rows is covered by
-- datasets: its rows are only ever written in a transaction that writes their dataset's row
-- (lib/dal/dataset-store.ts), and a per-row trigger would cost 5 us a row on every upload.
-- Foreign-key cascades fire no trigger; every table they reach from is watched here.
INSERT INTO `consumer_change_epoch` (`id`, `epoch`, `pruned`) VALUES (1, UUID(), 0);
--> statement-breakpoint
CREATE TRIGGER `assumptions_consumer_change_ai` AFTER INSERT ON `assumptions` FOR EACH ROW INSERT INTO `consumer_changes` (`connection_id`, `n`, `at`) VALUES (CONNECTION_ID(), 1, NOW(6)) ON DUPLICATE KEY UPDATE `n` = `n` + 1, `at` = NOW(6);
--> statement-breakpoint
CREATE TRIGGER `assumptions_consumer_change_au` AFTER UPDATE ON `assumptions` FOR EACH ROW INSERT INTO `consumer_changes` (`connection_id`, `n`, `at`) VALUES (CONNECTION_ID(), 1, NOW(6)) ON DUPLICATE KEY UPDATE `n` = `n` + 1, `at` = NOW(6);
--> statement-breakpoint
CREATE TRIGGER `assumptions_consumer_change_ad` AFTER DELETE ON `assumptions` FOR EACH ROW INSERT INTO `consumer_changes` (`connection_id`, `n`, `at`) VALUES (CONNECTION_ID(), 1, NOW(6)) ON DUPLICATE KEY UPDATE `n` = `n` + 1, `at` = NOW(6);
--> statement-breakpoint
CREATE TRIGGER `assumption_versions_consumer_change_ai` AFTER INSERT ON `assumption_versions` FOR EACH ROW INSERT INTO `consumer_changes` (`connection_id`, `n`, `at`) VALUES (CONNECTION_ID(), 1, NOW(6)) ON DUPLICATE KEY UPDATE `n` = `n` + 1, `at` = NOW(6);
--> statement-breakpoint
CREATE TRIGGER `assumption_versions_consumer_change_au` AFTER UPDATE ON `assumption_versions` FOR EACH ROW INSERT INTO `consumer_changes` (`connection_id`, `n`, `at`) VALUES (CONNECTION_ID(), 1, NOW(6)) ON DUPLICATE KEY UPDATE `n` = `n` + 1, `at` = NOW(6);
--> statement-breakpoint
CREATE TRIGGER `assumption_versions_consumer_change_ad` AFTER DELETE ON `assumption_versions` FOR EACH ROW INSERT INTO `consumer_changes` (`connection_id`, `n`, `at`) VALUES (CONNECTION_ID(), 1, NOW(6)) ON DUPLICATE KEY UPDATE `n` = `n` + 1, `at` = NOW(6);
--> statement-breakpoint
CREATE TRIGGER `users_consumer_change_ai` AFTER INSERT ON `users` FOR EACH ROW INSERT INTO `consumer_changes` (`connection_id`, `n`, `at`) VALUES (CONNECTION_ID(), 1, NOW(6)) ON DUPLICATE KEY UPDATE `n` = `n` + 1, `at` = NOW(6);
--> statement-breakpoint
CREATE TRIGGER `users_consumer_change_au` AFTER UPDATE ON `users` FOR EACH ROW INSERT INTO `consumer_changes` (`connection_id`, `n`, `at`) VALUES (CONNECTION_ID(), 1, NOW(6)) ON DUPLICATE KEY UPDATE `n` = `n` + 1, `at` = NOW(6);
--> statement-breakpoint
CREATE TRIGGER `users_consumer_change_ad` AFTER DELETE ON `users` FOR EACH ROW INSERT INTO `consumer_changes` (`connection_id`, `n`, `at`) VALUES (CONNECTION_ID(), 1, NOW(6)) ON DUPLICATE KEY UPDATE `n` = `n` + 1, `at` = NOW(6);
--> statement-breakpoint
CREATE TRIGGER `overdue_policy_changes_consumer_change_ai` AFTER INSERT ON `overdue_policy_changes` FOR EACH ROW INSERT INTO `consumer_changes` (`connection_id`, `n`, `at`) VALUES (CONNECTION_ID(), 1, NOW(6)) ON DUPLICATE KEY UPDATE `n` = `n` + 1, `at` = NOW(6);
--> statement-breakpoint
CREATE TRIGGER `overdue_policy_changes_consumer_change_au` AFTER UPDATE ON `overdue_policy_changes` FOR EACH ROW INSERT INTO `consumer_changes` (`connection_id`, `n`, `at`) VALUES (CONNECTION_ID(), 1, NOW(6)) ON DUPLICATE KEY UPDATE `n` = `n` + 1, `at` = NOW(6);
--> statement-breakpoint
CREATE TRIGGER `overdue_policy_changes_consumer_change_ad` AFTER DELETE ON `overdue_policy_changes` FOR EACH ROW INSERT INTO `consumer_changes` (`connection_id`, `n`, `at`) VALUES (CONNECTION_ID(), 1, NOW(6)) ON DUPLICATE KEY UPDATE `n` = `n` + 1, `at` = NOW(6);
--> statement-breakpoint
CREATE TRIGGER `datasets_consumer_change_ai` AFTER INSERT ON `datasets` FOR EACH ROW INSERT INTO `consumer_changes` (`connection_id`, `n`, `at`) VALUES (CONNECTION_ID(), 1, NOW(6)) ON DUPLICATE KEY UPDATE `n` = `n` + 1, `at` = NOW(6);
--> statement-breakpoint
CREATE TRIGGER `datasets_consumer_change_au` AFTER UPDATE ON `datasets` FOR EACH ROW INSERT INTO `consumer_changes` (`connection_id`, `n`, `at`) VALUES (CONNECTION_ID(), 1, NOW(6)) ON DUPLICATE KEY UPDATE `n` = `n` + 1, `at` = NOW(6);
--> statement-breakpoint
CREATE TRIGGER `datasets_consumer_change_ad` AFTER DELETE ON `datasets` FOR EACH ROW INSERT INTO `consumer_changes` (`connection_id`, `n`, `at`) VALUES (CONNECTION_ID(), 1, NOW(6)) ON DUPLICATE KEY UPDATE `n` = `n` + 1, `at` = NOW(6);
--> statement-breakpoint
CREATE TRIGGER `segments_consumer_change_ai` AFTER INSERT ON `segments` FOR EACH ROW INSERT INTO `consumer_changes` (`connection_id`, `n`, `at`) VALUES (CONNECTION_ID(), 1, NOW(6)) ON DUPLICATE KEY UPDATE `n` = `n` + 1, `at` = NOW(6);
--> statement-breakpoint
CREATE TRIGGER `segments_consumer_change_au` AFTER UPDATE ON `segments` FOR EACH ROW INSERT INTO `consumer_changes` (`connection_id`, `n`, `at`) VALUES (CONNECTION_ID(), 1, NOW(6)) ON DUPLICATE KEY UPDATE `n` = `n` + 1, `at` = NOW(6);
--> statement-breakpoint
CREATE TRIGGER `segments_consumer_change_ad` AFTER DELETE ON `segments` FOR EACH ROW INSERT INTO `consumer_changes` (`connection_id`, `n`, `at`) VALUES (CONNECTION_ID(), 1, NOW(6)) ON DUPLICATE KEY UPDATE `n` = `n` + 1, `at` = NOW(6);
--> statement-breakpoint
CREATE TRIGGER `evidence_backtests_consumer_change_ai` AFTER INSERT ON `evidence_backtests` FOR EACH ROW INSERT INTO `consumer_changes` (`connection_id`, `n`, `at`) VALUES (CONNECTION_ID(), 1, NOW(6)) ON DUPLICATE KEY UPDATE `n` = `n` + 1, `at` = NOW(6);
--> statement-breakpoint
CREATE TRIGGER `evidence_backtests_consumer_change_au` AFTER UPDATE ON `evidence_backtests` FOR EACH ROW INSERT INTO `consumer_changes` (`connection_id`, `n`, `at`) VALUES (CONNECTION_ID(), 1, NOW(6)) ON DUPLICATE KEY UPDATE `n` = `n` + 1, `at` = NOW(6);
--> statement-breakpoint
CREATE TRIGGER `evidence_backtests_consumer_change_ad` AFTER DELETE ON `evidence_backtests` FOR EACH ROW INSERT INTO `consumer_changes` (`connection_id`, `n`, `at`) VALUES (CONNECTION_ID(), 1, NOW(6)) ON DUPLICATE KEY UPDATE `n` = `n` + 1, `at` = NOW(6);

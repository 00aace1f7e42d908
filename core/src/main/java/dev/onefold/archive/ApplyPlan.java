package dev.onefold.archive;

import dev.onefold.BatchReport;
import dev.onefold.Rejection;
import dev.onefold.internal.archive.Plan;
import java.util.ArrayList;
import java.util.List;

/**
 * A batch planned against one archive version: the partition tasks to hand to workers and the batch's counts.
 * Commit it with {@link Archive#commit} once every task has a result. Immutable and thread-safe.
 */
public final class ApplyPlan {
    final Plan plan;
    final BatchReport batch;
    final List<Rejection> rejections;

    ApplyPlan(Plan plan, BatchReport batch, List<Rejection> rejections) {
        this.plan = plan;
        this.batch = batch;
        this.rejections = List.copyOf(rejections);
    }

    /** The version the plan was made against. */
    public long baseVersion() {
        return plan.base().version();
    }

    /** One task per partition that changes, sorted by partition name. */
    public List<PartitionTask> tasks() {
        List<PartitionTask> out = new ArrayList<>(plan.tasks().size());
        plan.tasks().forEach(t -> out.add(new PartitionTask(t)));
        return out;
    }

    public BatchReport batch() {
        return batch;
    }
}

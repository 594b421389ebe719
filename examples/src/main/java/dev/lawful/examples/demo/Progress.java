package dev.lawful.examples.demo;

import java.io.PrintStream;
import me.tongfei.progressbar.ConsoleProgressBarConsumer;
import me.tongfei.progressbar.ProgressBar;
import me.tongfei.progressbar.ProgressBarBuilder;
import me.tongfei.progressbar.ProgressBarStyle;

/**
 * Where the demo reports progress: a console progress bar per task (count, rate, time left and a short message such
 * as the current loss), or nothing at all ({@link #quiet()}).
 */
public interface Progress {

    /**
     * @param name what is being done ("reformer: data")
     * @param max  the number of steps
     * @return the running task; close it when done
     */
    Task start(String name, long max);

    /** A running task. */
    interface Task extends AutoCloseable {
        /** @param done the number of steps done so far */
        void stepTo(long done);

        /** @param message a short note shown beside the bar (the loss, for example) */
        void message(String message);

        /** Ends the task's display. */
        @Override
        void close();
    }

    /** @return progress that shows nothing */
    static Progress quiet() {
        return (name, max) -> new Task() {
            @Override
            public void stepTo(long done) {
            }

            @Override
            public void message(String message) {
            }

            @Override
            public void close() {
            }
        };
    }

    /**
     * @param out the stream the bars are drawn on (standard error, so results on standard output stay clean)
     * @return progress drawn as ASCII bars, redrawn in place
     */
    static Progress console(PrintStream out) {
        return (name, max) -> {
            ProgressBar bar = new ProgressBarBuilder().setTaskName(name).setInitialMax(max)
                    .setStyle(ProgressBarStyle.ASCII).setUpdateIntervalMillis(250)
                    .setConsumer(new ConsoleProgressBarConsumer(out, 100)).build();
            return new Task() {
                @Override
                public void stepTo(long done) {
                    bar.stepTo(done);
                }

                @Override
                public void message(String message) {
                    bar.setExtraMessage(message);
                }

                @Override
                public void close() {
                    bar.close();
                }
            };
        };
    }
}

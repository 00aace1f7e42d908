/**
 * jqwik arbitraries for the sink test kit; the only onefold package that needs jqwik (an optional dependency).
 */
package dev.onefold.testkit.jqwik;

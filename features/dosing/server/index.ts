export { planCalendar, type CalendarInput } from "./calendar";

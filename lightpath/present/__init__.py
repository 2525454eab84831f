"""Presentation: tables, JSON/CSV, iCalendar files, figures and HTML reports. Computes nothing new."""

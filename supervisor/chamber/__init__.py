"""Recompression treatments: plan one from a bundled treatment table, log it as run.

Modules, each with one job:

``catalogue``    the bundled treatment tables by published number (``5``, ``6``, ``6A`` ...)
``clock``        clock times in and out (``HH:MM``, across midnight)
``extensions``   the extensions a table allows and the arithmetic of asking for them
``timeline``     a table laid out in time with its extensions: the one typed model of a
                 chamber run, on which the treatment record and the chamber part of surface
                 decompression are to be built
``doses``        the patient's OTU and CNS by the chamber rule
``attendant``    the inside attendant: oxygen rule, own decompression, dose, policy
``ventilation``  Navy per-person ventilation and the chamber's own gas for a treatment
``atmosphere``   chamber oxygen, CO2 and temperature limits with their sources
``procedures``   the cited rules around a treatment (intervals, observation, re-treatment,
                 oxygen toxicity)
``treatment``    the plan (``supervisor.treatment/1``)
``log``          the treatment as run against the plan (``supervisor.treatment-log/1``)
``render``       plain-text views for the chamber operator
``cautions``     the cautions printed with every plan and log

Everything here supports the chamber operator's and the diving medical officer's
decision; the governing procedure and the diving medical officer decide.
"""

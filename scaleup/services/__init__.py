"""The parts of the service layer, composed into :class:`scaleup.campaign.Campaign`."""
